import useSWR from 'swr';
import { api, type ApiError } from '../api/client';
import type { ChangePassword, PasswordReset, PasswordResetPreview } from '../contracts/session';

type ResetSent = { to: string; expiresAt: string };
import { useSubmit } from './use-submit';

/** Whose password a reset link sets; the token goes in a POST body so it stays out of server logs. */
export function useResetPreview(token: string | null) {
  const { data, error, mutate } = useSWR(token ? ['reset-preview', token] : null, ([, t]) =>
    api<PasswordResetPreview>('/password-resets/preview', { method: 'POST', body: { token: t } }),
  );
  return { data, error: error as ApiError | undefined, retry: () => mutate() };
}

export const useResetPassword = () => useSubmit((body: PasswordReset) => api<{ email: string }>('/password-resets', { method: 'POST', body }), []);

/** Your own password; the server ends your other sessions. */
export const useChangePassword = () =>
  useSubmit(async (body: ChangePassword) => {
    await api<null>('/session/password', { method: 'POST', body });
    return true;
  }, []);

/** An admin mails one of the site's people a reset link. */
export const useSendReset = () =>
  useSubmit((userId: number) => api<ResetSent>(`/users/${userId}/password-reset`, { method: 'POST', body: {} }), ['/mail-outbox']);
