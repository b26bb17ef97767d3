/** On phones' native builds there is no service worker: the app store updates the app. */
export function UpdatePrompt() {
  return null;
}
