import { useSWRConfig } from 'swr';
import { api } from '../api/client';
import { keys } from '../api/keys';

export function useSignOut() {
  const { mutate } = useSWRConfig();
  return async function signOut() {
    await api<void>(keys.session, { method: 'DELETE' }).catch(() => undefined);
    await mutate(() => true, undefined, { revalidate: false });
    await mutate(keys.session, null, { revalidate: false });
  };
}
