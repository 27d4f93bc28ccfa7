import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Vessel, VesselInput } from '../contracts/vessels';
import { useSubmit } from './use-submit';

/** Adds a vessel (no id) or changes one; field errors come back from the server's limit rules. */
export const useSaveVessel = () =>
  useSubmit((id: number | null, body: VesselInput) => api<Vessel>(id ? `/vessels/${id}` : '/vessels', { method: id ? 'PATCH' : 'POST', body }), [keys.vessels]);
