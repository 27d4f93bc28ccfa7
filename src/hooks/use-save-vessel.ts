import { useState } from 'react';
import { useSWRConfig } from 'swr';
import { api, ApiError } from '../api/client';
import { keys } from '../api/keys';
import type { Vessel, VesselInput } from '../contracts/vessels';

/** Adds a vessel (no id) or changes one; field errors come back from the server's limit rules. */
export function useSaveVessel() {
  const { mutate } = useSWRConfig();
  const [error, setError] = useState<ApiError | null>(null);
  const [isBusy, setBusy] = useState(false);
  async function save(id: number | null, body: VesselInput): Promise<Vessel | null> {
    setBusy(true);
    setError(null);
    try {
      const v = await api<Vessel>(id ? `/vessels/${id}` : '/vessels', { method: id ? 'PATCH' : 'POST', body });
      await mutate(keys.vessels);
      return v;
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'unknown', String(e)));
      return null;
    } finally {
      setBusy(false);
    }
  }
  return { save, error, isBusy, reset: () => setError(null) };
}
