import { api } from '../api/client';
import { InviteAccepted, InvitePreview, type AcceptInvite } from '../contracts/invites';
import { useMutation } from './use-mutation';
import useSWR from 'swr';
import type { ApiError } from '../api/client';

/** The invite behind a link's token; the token goes in a POST body so it stays out of server logs. */
export function useInvitePreview(token: string | null) {
  const { data, error, mutate } = useSWR(token ? ['invite-preview', token] : null, ([, t]) => api('/invites/preview', InvitePreview, { method: 'POST', body: { token: t } }));
  return { data, error: error as ApiError | undefined, retry: () => mutate() };
}

export const useAcceptInvite = () => useMutation((body: AcceptInvite) => api('/invites/accept', InviteAccepted, { method: 'POST', body }), []);
