import { CACHED_AT_HEADER } from '../web/offline';

// Which API reads were last answered from the device's cache (the service worker's, when the network failed or
// was too slow), and as of when: the screen says so beside the figures instead of passing them off as current.

const asOf = new Map<string, string>();
const listeners = new Set<() => void>();

/** Records how `path` was last answered: from the cache (the header's server time) or fresh from the network. */
export function noteAnswer(path: string, headers: Headers): void {
  const cachedAt = headers.get(CACHED_AT_HEADER);
  const next = cachedAt === null ? null : cachedAt || 'unknown';
  if ((asOf.get(path) ?? null) === next) return;
  if (next === null) asOf.delete(path);
  else asOf.set(path, next);
  for (const l of listeners) l();
}

/** The server time (HTTP date) of the cached answer last shown for `path`, or null when it came from the network. */
export const cachedAnswerAt = (path: string | null): string | null => (path === null ? null : (asOf.get(path) ?? null));

export function subscribeCachedAnswers(listener: () => void): () => void {
  listeners.add(listener);
  return () => listeners.delete(listener);
}
