import useSWR from 'swr';
import { api, type ApiError } from '../api/client';
import { keys } from '../api/keys';
import { PAGE_SESSION_ID } from '../contracts/rules';
import type { SessionState, Session } from '../contracts/session';

const toSession = (state: SessionState): Session | null => (state.user ? { user: state.user } : null);

/** The session the server wrote into the page, if any (read once: later changes come from the API). */
function pageSession(): SessionState | undefined {
  if (typeof document === 'undefined') return undefined;
  const block = document.getElementById(PAGE_SESSION_ID);
  if (!block?.textContent) return undefined;
  try {
    return JSON.parse(block.textContent) as SessionState;
  } catch {
    return undefined;
  }
}

// Until the app has read the session itself, the page's copy stands in: the signed-in shell renders in the first
// pass with no round trip. Sign-in and sign-out write the cache (null when signed out), so it never shows again.
const fromPage = pageSession();
const OPTIONS = fromPage ? { fallbackData: toSession(fromPage), revalidateOnMount: false } : {};

/** The signed-in user's session, `null` when signed out. */
export function useSession() {
  const { data, error, isLoading, mutate } = useSWR(
    keys.session,
    async (): Promise<Session | null> => toSession(await api<SessionState>(keys.session)),
    OPTIONS,
  );
  return { session: data, error: error as ApiError | undefined, isLoading, mutate };
}
