import { keys } from '../api/keys';
import { SiteSummary } from '../contracts/site';
import { useResource } from './use-resource';

export const useSite = () => useResource(keys.site, SiteSummary);
