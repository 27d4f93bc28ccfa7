import { useCallback, useDeferredValue, useSyncExternalStore } from 'react';
import useSWR from 'swr';
import { cachedAnswerAt, subscribeCachedAnswers } from '../api/cached-answers';
import { api, type ApiError } from '../api/client';

/**
 * SWR read of one API path, typed by its contract; `null` path skips the request. `cachedAt` is the server time
 * of the answer shown when it came from the device's cache (offline), else null.
 */
export function useResource<T>(path: string | null, opts: { refreshMs?: number } = {}) {
  const { data: latest, error, isLoading, mutate } = useSWR(path, (p: string) => api<T>(p), opts.refreshMs ? { refreshInterval: opts.refreshMs } : undefined);
  // Arriving data renders in a transition: React slices the screen's render into short tasks, so a slow phone
  // stays responsive to taps while a long list or chart draws (screens show their loader until then).
  const data = useDeferredValue(latest);
  const cachedAt = useSyncExternalStore(
    subscribeCachedAnswers,
    useCallback(() => cachedAnswerAt(path), [path]),
    () => null,
  );
  return { data, error: error as ApiError | undefined, isLoading, retry: () => mutate(), cachedAt };
}
