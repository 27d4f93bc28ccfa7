import { api } from '../api/client';
import { keys } from '../api/keys';
import type { SitePatch, SiteSummary } from '../contracts/site';
import { useSubmit } from './use-submit';

/** The admin sets the site's currency; the session carries it to every screen, so it is read again. */
export const useUpdateSite = () => useSubmit((body: SitePatch) => api<SiteSummary>(keys.site, { method: 'PATCH', body }), [keys.site, keys.session]);
