import { api } from '../api/client';
import { keys } from '../api/keys';
import { Batch, type BatchStart } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useStartBatch = () => useSubmit((input: BatchStart) => api('/batches', Batch, { method: 'POST', body: input }), [keys.batches]);
