import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Batch, BatchStart } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useStartBatch = () => useSubmit((input: BatchStart) => api<Batch>('/batches', { method: 'POST', body: input }), [keys.batches]);
