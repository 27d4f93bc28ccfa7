import { keys } from '../api/keys';
import { VesselList } from '../contracts/vessels';
import { useResource } from './use-resource';

export const useVessels = () => useResource(keys.vessels, VesselList);
