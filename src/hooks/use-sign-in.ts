import { useState } from 'react';
import { useSWRConfig } from 'swr';
import { api, ApiError } from '../api/client';
import { keys } from '../api/keys';
import type { Session, SignInRequest } from '../contracts/session';
import { clearUserCaches } from '../web/offline';

export function useSignIn() {
  const { mutate } = useSWRConfig();
  const [error, setError] = useState<ApiError | null>(null);
  const [isSubmitting, setSubmitting] = useState(false);
  async function signIn(body: SignInRequest) {
    setSubmitting(true);
    setError(null);
    try {
      const session = await api<Session>(keys.session, { method: 'POST', body });
      // A new user: drop every cached answer of the previous one (the service worker's too), then prime the session.
      await clearUserCaches();
      await mutate(() => true, undefined, { revalidate: false });
      await mutate(keys.session, session, { revalidate: false });
      return session;
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'unknown', String(e)));
      return null;
    } finally {
      setSubmitting(false);
    }
  }
  return { signIn, error, isSubmitting };
}
