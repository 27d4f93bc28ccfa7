import { useSWRConfig } from 'swr';
import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Session, SignInRequest } from '../contracts/session';
import { clearUserCaches } from '../web/offline';
import { useSubmit } from './use-submit';

export function useSignIn() {
  const { mutate } = useSWRConfig();
  return useSubmit(async (body: SignInRequest) => {
    const session = await api<Session>(keys.session, { method: 'POST', body });
    // A new user: drop every cached answer of the previous one (the service worker's too), then prime the session.
    await clearUserCaches();
    await mutate(() => true, undefined, { revalidate: false });
    await mutate(keys.session, session, { revalidate: false });
    return session;
  }, []);
}
