import { api } from '../api/client';
import { keys } from '../api/keys';
import { OutboxMessage } from '../contracts/mail';
import { useMutation } from './use-mutation';

export const useRetryMail = () => useMutation((id: number) => api(`/mail-outbox/${id}/retry`, OutboxMessage, { method: 'POST', body: {} }), [keys.mailOutbox]);
