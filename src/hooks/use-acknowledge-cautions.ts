import { useSWRConfig } from 'swr';
import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Session } from '../contracts/session';

export function useAcknowledgeCautions() {
  const { mutate } = useSWRConfig();
  return async function acknowledge() {
    const session = await api<Session>(keys.session, { method: 'PATCH', body: { cautionsAcknowledged: true } });
    await mutate(keys.session, session, { revalidate: false });
  };
}
