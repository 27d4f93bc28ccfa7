import { keys, lotKey } from '../api/keys';
import type { LotDetail, LotList } from '../contracts/lots';
import { useResource } from './use-resource';

export const useLots = () => useResource<LotList>(keys.lots);
export const useLot = (id: number | null) => useResource<LotDetail>(id ? lotKey(id) : null);
