import type { FilePickerProps } from './FilePicker.types';

/** On phones the CSV is pasted into the text box; there is no file chooser to show. */
export function FilePicker(_props: FilePickerProps) {
  return null;
}
