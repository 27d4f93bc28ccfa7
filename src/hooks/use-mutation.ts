import { useState } from 'react';
import { useSWRConfig } from 'swr';
import { ApiError } from '../api/client';

/** Runs one kind of write: tracks busy and the API error, and revalidates the keys the write changed. */
export function useMutation<A, R>(run: (arg: A) => Promise<R>, revalidates: readonly string[]) {
  const { mutate } = useSWRConfig();
  const [error, setError] = useState<ApiError | null>(null);
  const [isSubmitting, setSubmitting] = useState(false);
  async function submit(arg: A): Promise<R | null> {
    setSubmitting(true);
    setError(null);
    try {
      const out = await run(arg);
      await Promise.all(revalidates.map((k) => mutate(k)));
      return out;
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'unknown', String(e)));
      return null;
    } finally {
      setSubmitting(false);
    }
  }
  return { submit, error, isSubmitting, reset: () => setError(null) };
}
