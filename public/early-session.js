/*
 * Starts the session read while the app's scripts are still loading and starting (about a second
 * on a slow phone): the app's first GET /api/session takes this answer instead of asking again
 * (components/api/client.ts, takeEarly). Same request as the app's own; a failure here is
 * ignored and the app then asks by itself.
 */
(function () {
  try {
    var session = fetch('/api/session', { method: 'GET', credentials: 'same-origin', headers: { Accept: 'application/json' } });
    session.catch(function () {});
    window.__trimoutEarly = { '/api/session': session };
  } catch (_e) {
    // no fetch: the app asks by itself
  }
})();
