import { keys } from '../api/keys';
import { LotList } from '../contracts/lots';
import { useResource } from './use-resource';

export const useLots = () => useResource(keys.lots, LotList);
