import { api } from '../api/client';
import { keys } from '../api/keys';
import type { OutboxMessage } from '../contracts/mail';
import { useSubmit } from './use-submit';

export const useRetryMail = () => useSubmit((id: number) => api<OutboxMessage>(`/mail-outbox/${id}/retry`, { method: 'POST', body: {} }), [keys.mailOutbox]);
