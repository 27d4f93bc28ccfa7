import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Deviation } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useAcknowledgeDeviation = () =>
  useSubmit((id: number, comment: string) => api<Deviation>(`/deviations/${id}/acknowledge`, { method: 'POST', body: { comment } }), [keys.batches]);
