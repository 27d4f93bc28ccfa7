import { api } from '../api/client';
import { keys } from '../api/keys';
import { Deviation } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useAcknowledgeDeviation = () =>
  useSubmit((id: number, comment: string) => api(`/deviations/${id}/acknowledge`, Deviation, { method: 'POST', body: { comment } }), [keys.batches]);
