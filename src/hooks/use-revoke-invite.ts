import { api } from '../api/client';
import { keys } from '../api/keys';
import { useSubmit } from './use-submit';

export const useRevokeInvite = () => useSubmit((id: number) => api<void>(`/invites/${id}`, { method: 'DELETE' }), [keys.invites, keys.billing]);
