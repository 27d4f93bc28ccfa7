import { api } from '../api/client';
import { keys } from '../api/keys';
import { Invite, type CreateInvite } from '../contracts/invites';
import { useMutation } from './use-mutation';

export const useCreateInvite = () => useMutation((body: CreateInvite) => api('/invites', Invite, { method: 'POST', body }), [keys.invites, keys.billing, keys.mailOutbox]);
