import { api } from '../api/client';
import { keys } from '../api/keys';
import type { OutboxMessage } from '../contracts/mail';
import { useMutation } from './use-mutation';

export const useRetryMail = () => useMutation((id: number) => api<OutboxMessage>(`/mail-outbox/${id}/retry`, { method: 'POST', body: {} }), [keys.mailOutbox]);
