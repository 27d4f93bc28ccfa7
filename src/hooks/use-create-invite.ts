import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Invite, CreateInvite } from '../contracts/invites';
import { useSubmit } from './use-submit';

export const useCreateInvite = () =>
  useSubmit((body: CreateInvite) => api<Invite>('/invites', { method: 'POST', body }), [keys.invites, keys.billing, keys.mailOutbox]);
