import { api } from '../api/client';
import { batchLinkKey, linkKeys } from '../api/keys';
import type { BatchLink, CertificateInfo, LinkStatusList, TrustRequest, VesselSource, VesselSourceInput, VesselSourceList } from '../contracts/control-link';
import { useResource } from './use-resource';
import { useSubmit } from './use-submit';

// While a batch runs its link is read every few seconds, so values from the control system show as they arrive.
const LIVE_MS = 5000;

export const useBatchLink = (id: number, isRunning: boolean) => useResource<BatchLink>(batchLinkKey(id), { refreshMs: isRunning ? LIVE_MS : undefined });
export const useLinkStatus = () => useResource<LinkStatusList>(linkKeys.status, { refreshMs: LIVE_MS });
export const useVesselSources = () => useResource<VesselSourceList>(linkKeys.sources);

/** Sets a vessel's source (admin); the status and sources are read again. */
export const useSaveSource = () =>
  useSubmit(
    (vesselId: number, body: VesselSourceInput) => api<VesselSource>(`/control-link/sources/${vesselId}`, { method: 'PUT', body }),
    [linkKeys.sources, linkKeys.status],
  );

/** Asks the server for its certificate now (admin), to compare its thumbprint before trusting it. */
export const useServerCertificate = () => useSubmit((vesselId: number) => api<CertificateInfo>(`/control-link/sources/${vesselId}/server-certificate`), []);

export const useTrustServer = () =>
  useSubmit(
    (vesselId: number, body: TrustRequest) => api<VesselSource>(`/control-link/sources/${vesselId}/trust`, { method: 'POST', body }),
    [linkKeys.sources, linkKeys.status],
  );
