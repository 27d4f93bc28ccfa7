import { keys } from '../api/keys';
import type { InviteList } from '../contracts/invites';
import { useResource } from './use-resource';

export const useInvites = () => useResource<InviteList>(keys.invites);
