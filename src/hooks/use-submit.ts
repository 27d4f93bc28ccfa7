import { useState } from 'react';
import { useSWRConfig } from 'swr';
import { ApiError } from '../api/client';

/**
 * One mutation's busy and error state; after success, every cached read whose key starts with one of
 * `revalidate` is fetched again, so lists and details show the change.
 */
export function useSubmit<A extends unknown[], R>(run: (...args: A) => Promise<R>, revalidate: readonly string[]) {
  const { mutate } = useSWRConfig();
  const [error, setError] = useState<ApiError | null>(null);
  const [isBusy, setBusy] = useState(false);
  async function submit(...args: A): Promise<R | null> {
    setBusy(true);
    setError(null);
    try {
      const result = await run(...args);
      await mutate((key) => typeof key === 'string' && revalidate.some((p) => key.startsWith(p)));
      return result;
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'unknown', String(e)));
      return null;
    } finally {
      setBusy(false);
    }
  }
  return { submit, error, isBusy, clearError: () => setError(null) };
}
