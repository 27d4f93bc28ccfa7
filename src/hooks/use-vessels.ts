import { keys } from '../api/keys';
import type { VesselList } from '../contracts/vessels';
import { useResource } from './use-resource';

export const useVessels = () => useResource<VesselList>(keys.vessels);
