import { keys } from '../api/keys';
import type { SiteSummary } from '../contracts/site';
import { useResource } from './use-resource';

export const useSite = () => useResource<SiteSummary>(keys.site);
