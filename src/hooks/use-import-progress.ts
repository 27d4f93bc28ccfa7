import useSWR from 'swr';
import { api } from '../api/client';
import type { ImportProgress } from '../contracts/batches';

/** How far the batch's running historian import has got, asked every second while `isActive`. */
export function useImportProgress(batchId: number, isActive: boolean): ImportProgress | undefined {
  const { data } = useSWR(isActive ? `/batches/${batchId}/readings/import` : null, (p: string) => api<ImportProgress>(p), {
    refreshInterval: 1000,
    dedupingInterval: 500,
  });
  return isActive ? data : undefined;
}
