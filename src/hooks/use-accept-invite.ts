import { api } from '../api/client';
import type { InviteAccepted, InvitePreview, AcceptInvite } from '../contracts/invites';
import { useSubmit } from './use-submit';
import useSWR from 'swr';
import type { ApiError } from '../api/client';

/** The invite behind a link's token; the token goes in a POST body so it stays out of server logs. */
export function useInvitePreview(token: string | null) {
  const { data, error, mutate } = useSWR(token ? ['invite-preview', token] : null, ([, t]) =>
    api<InvitePreview>('/invites/preview', { method: 'POST', body: { token: t } }),
  );
  return { data, error: error as ApiError | undefined, retry: () => mutate() };
}

export const useAcceptInvite = () => useSubmit((body: AcceptInvite) => api<InviteAccepted>('/invites/accept', { method: 'POST', body }), []);
