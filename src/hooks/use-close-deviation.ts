import { api } from '../api/client';
import { keys } from '../api/keys';
import { Deviation } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useCloseDeviation = () =>
  useSubmit((id: number, comment: string) => api(`/deviations/${id}/close`, Deviation, { method: 'POST', body: comment ? { comment } : {} }), [keys.batches]);
