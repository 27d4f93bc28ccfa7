import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Deviation } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useCloseDeviation = () =>
  useSubmit((id: number, comment: string) => api<Deviation>(`/deviations/${id}/close`, { method: 'POST', body: comment ? { comment } : {} }), [keys.batches]);
