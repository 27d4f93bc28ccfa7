import { keys } from '../api/keys';
import type { Outbox } from '../contracts/mail';
import { useResource } from './use-resource';

export const useMailOutbox = () => useResource<Outbox>(keys.mailOutbox);
