import { api } from '../api/client';
import { keys } from '../api/keys';
import { User, type UpdateUser } from '../contracts/users';
import { useMutation } from './use-mutation';

export const useUpdateUser = () =>
  useMutation(({ id, patch }: { id: number; patch: UpdateUser }) => api(`/users/${id}`, User, { method: 'PATCH', body: patch }), [keys.users, keys.site, keys.billing]);
