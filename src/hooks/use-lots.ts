import { keys, lotKey } from '../api/keys';
import { LotDetail, LotList } from '../contracts/lots';
import { useResource } from './use-resource';

export const useLots = () => useResource(keys.lots, LotList);
export const useLot = (id: number | null) => useResource(id ? lotKey(id) : null, LotDetail);
