import useSWR from 'swr';
import { api, type ApiError } from '../api/client';
import { keys } from '../api/keys';
import type { SessionState, Session } from '../contracts/session';

/** The signed-in user's session, `null` when signed out. */
export function useSession() {
  const { data, error, isLoading, mutate } = useSWR(keys.session, async (): Promise<Session | null> => {
    const state = await api<SessionState>(keys.session);
    return state.user ? { user: state.user } : null;
  });
  return { session: data, error: error as ApiError | undefined, isLoading, mutate };
}
