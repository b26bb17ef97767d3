/**
 * The service worker (generated at build time, scripts/lib/pwa.ts) on the web, in production
 * builds only: the development server and jest never register it.
 *
 * A new deploy installs a new worker beside the running one. It waits, so the open page keeps
 * the files it was built with, until the app is closed or the user accepts the update; then it
 * takes over and the page reloads once. Updating the shell touches only the worker's own caches:
 * IndexedDB and localStorage (drafts, queued work) are left as they are.
 */
export const SERVICE_WORKER_URL = '/sw.js';

/** Makes the waiting worker take over; the page reloads when it has. */
export type ApplyUpdate = () => void;

export function serviceWorkerSupported(): boolean {
  return (
    process.env.NODE_ENV === 'production' &&
    typeof window !== 'undefined' &&
    typeof navigator !== 'undefined' &&
    'serviceWorker' in navigator
  );
}

/** Registers the worker; `onUpdateReady` is called when a new version waits to take over. */
export function registerServiceWorker(onUpdateReady: (apply: ApplyUpdate) => void): void {
  if (!serviceWorkerSupported()) return;
  const container = navigator.serviceWorker;
  const offer = (worker: ServiceWorker) =>
    onUpdateReady(() => {
      let reloading = false;
      // Listened for only now: the first install also changes the controller, and must not reload.
      container.addEventListener('controllerchange', () => {
        if (reloading) return;
        reloading = true;
        window.location.reload();
      });
      // workbox-build's generated worker calls skipWaiting() on this message.
      worker.postMessage({ type: 'SKIP_WAITING' });
    });

  container
    .register(SERVICE_WORKER_URL, { scope: '/' })
    .then((registration) => {
      // A worker already waiting (installed while an earlier page was open) is offered at once.
      if (registration.waiting && container.controller) offer(registration.waiting);
      registration.addEventListener('updatefound', () => {
        const installing = registration.installing;
        if (!installing) return;
        installing.addEventListener('statechange', () => {
          // Installed while another worker controls the page: an update. The first install has no controller.
          if (installing.state === 'installed' && container.controller) offer(installing);
        });
      });
      // A phone keeps the app open for days: look for a new deploy whenever it comes back to the front.
      document.addEventListener('visibilitychange', () => {
        if (document.visibilityState === 'visible') registration.update().catch(() => undefined);
      });
    })
    .catch(() => {
      // No worker (private mode, storage refused): the app still works while online.
    });
}
