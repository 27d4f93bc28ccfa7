import { keys } from '../api/keys';
import { InviteList } from '../contracts/invites';
import { useResource } from './use-resource';

export const useInvites = () => useResource(keys.invites, InviteList);
