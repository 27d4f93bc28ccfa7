import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Invite, CreateInvite } from '../contracts/invites';
import { useMutation } from './use-mutation';

export const useCreateInvite = () => useMutation((body: CreateInvite) => api<Invite>('/invites', { method: 'POST', body }), [keys.invites, keys.billing, keys.mailOutbox]);
