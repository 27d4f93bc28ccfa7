import { useSWRConfig } from 'swr';
import { api } from '../api/client';
import { keys } from '../api/keys';
import { clearUserCaches } from '../web/offline';

export function useSignOut() {
  const { mutate } = useSWRConfig();
  return async function signOut() {
    await api<void>(keys.session, { method: 'DELETE' }).catch(() => undefined);
    // Offline too: the device keeps none of this user's answers or pages (their unsent readings stay, under their name).
    await clearUserCaches();
    await mutate(() => true, undefined, { revalidate: false });
    await mutate(keys.session, null, { revalidate: false });
  };
}
