import { api } from '../api/client';
import { keys } from '../api/keys';
import { useMutation } from './use-mutation';

export const useRevokeInvite = () => useMutation((id: number) => api<void>(`/invites/${id}`, { method: 'DELETE' }), [keys.invites, keys.billing]);
