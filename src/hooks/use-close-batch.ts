import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Batch, BatchClose } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useCloseBatch = (id: number) =>
  useSubmit((input: BatchClose) => api<Batch>(`/batches/${id}/close`, { method: 'POST', body: input }), [keys.batches]);
