import { api } from '../api/client';
import { keys } from '../api/keys';
import type { User, UpdateUser } from '../contracts/users';
import { useSubmit } from './use-submit';

export const useUpdateUser = () =>
  useSubmit(
    ({ id, patch }: { id: number; patch: UpdateUser }) => api<User>(`/users/${id}`, { method: 'PATCH', body: patch }),
    [keys.users, keys.site, keys.billing],
  );
