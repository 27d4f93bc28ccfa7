// The installable app's offline side, shared by the build (server/web-offline.ts writes the service worker with
// these names) and the app (registers it, clears a user's cached answers at sign-in and sign-out).

/** Where the build writes the service worker; served from the site's root so its scope is the whole app. */
export const SERVICE_WORKER_URL = '/sw.js';

/**
 * Runtime caches that hold a signed-in user's data: API reads (GET /api/...) and the pages as served (each with
 * its session written in). Emptied at every sign-in and sign-out, so a cached page never shows another user's
 * data. The precache (bundle parts, fonts, the build's page files) holds no user data and stays.
 */
export const USER_CACHES = ['yieldpoint-api', 'yieldpoint-pages'] as const;

/**
 * Set by the service worker on an API answer it took from its cache because the network failed or was slower
 * than its timeout; the value is the answer's own `Date` header (when the server sent it).
 */
export const CACHED_AT_HEADER = 'x-yieldpoint-cached-at';

/** Registers the service worker once the page has loaded, so its precache never competes with the first paint. */
export function registerServiceWorker(): void {
  if (__DEV__ || typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return;
  const register = () => void navigator.serviceWorker.register(SERVICE_WORKER_URL).catch(() => undefined);
  if (document.readyState === 'complete') register();
  else window.addEventListener('load', register, { once: true });
}

/** Empties the caches that hold a user's data (see USER_CACHES). */
export async function clearUserCaches(): Promise<void> {
  if (typeof caches === 'undefined') return;
  await Promise.all(USER_CACHES.map((name) => caches.delete(name)));
}
