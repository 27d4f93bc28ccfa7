import useSWR from 'swr';
import type { z } from 'zod';
import { api, type ApiError } from '../api/client';

/** SWR read of one API path parsed with its contract; `null` path skips the request. */
export function useResource<S extends z.ZodType>(path: string | null, schema: S) {
  const { data, error, isLoading, mutate } = useSWR(path, (p: string) => api(p, schema));
  return { data, error: error as ApiError | undefined, isLoading, retry: () => mutate() };
}
