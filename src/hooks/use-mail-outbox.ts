import { keys } from '../api/keys';
import { Outbox } from '../contracts/mail';
import { useResource } from './use-resource';

export const useMailOutbox = () => useResource(keys.mailOutbox, Outbox);
