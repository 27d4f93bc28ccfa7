import { keys } from '../api/keys';
import { UserList } from '../contracts/users';
import { useResource } from './use-resource';

export const useUsers = () => useResource(keys.users, UserList);
