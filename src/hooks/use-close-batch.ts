import { api } from '../api/client';
import { keys } from '../api/keys';
import { Batch, type BatchClose } from '../contracts/batches';
import { useSubmit } from './use-submit';

export const useCloseBatch = (id: number) => useSubmit((input: BatchClose) => api(`/batches/${id}/close`, Batch, { method: 'POST', body: input }), [keys.batches]);
