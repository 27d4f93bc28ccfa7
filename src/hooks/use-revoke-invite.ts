import { api } from '../api/client';
import { keys } from '../api/keys';
import { useMutation } from './use-mutation';

export const useRevokeInvite = () => useMutation((id: number) => api(`/invites/${id}`, null, { method: 'DELETE' }), [keys.invites, keys.billing]);
