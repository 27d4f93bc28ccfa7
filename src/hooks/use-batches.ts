import { batchKey, keys } from '../api/keys';
import { BatchDetail, BatchList } from '../contracts/batches';
import { useResource } from './use-resource';

export const useBatches = () => useResource(keys.batches, BatchList);

export const useBatch = (id: number | null) => useResource(id ? batchKey(id) : null, BatchDetail);
