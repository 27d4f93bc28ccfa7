import { api } from '../api/client';
import { keys } from '../api/keys';
import type { BatchSettings, BatchSettingsPatch } from '../contracts/batches';
import { useResource } from './use-resource';
import { useSubmit } from './use-submit';

/** The site's deviation rules: the band around the plan and the longest gap between readings. */
export const useBatchSettings = () => useResource<BatchSettings>(keys.batchSettings);

/** Changes the rules (supervisor or admin); every batch view is read again, since their deviations follow them. */
export const useUpdateBatchSettings = () =>
  useSubmit((body: BatchSettingsPatch) => api<BatchSettings>(keys.batchSettings, { method: 'PATCH', body }), [keys.batches]);
