import useSWR from 'swr';
import { api, type ApiError } from '../api/client';

/** SWR read of one API path, typed by its contract; `null` path skips the request. */
export function useResource<T>(path: string | null) {
  const { data, error, isLoading, mutate } = useSWR(path, (p: string) => api<T>(p));
  return { data, error: error as ApiError | undefined, isLoading, retry: () => mutate() };
}
