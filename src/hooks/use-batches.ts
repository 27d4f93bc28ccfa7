import { batchKey, keys } from '../api/keys';
import type { BatchDetail, BatchList } from '../contracts/batches';
import { useResource } from './use-resource';

export const useBatches = () => useResource<BatchList>(keys.batches);

export const useBatch = (id: number | null, opts: { refreshMs?: number } = {}) => useResource<BatchDetail>(id ? batchKey(id) : null, opts);
