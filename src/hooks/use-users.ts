import { keys } from '../api/keys';
import type { UserList } from '../contracts/users';
import { useResource } from './use-resource';

export const useUsers = () => useResource<UserList>(keys.users);
