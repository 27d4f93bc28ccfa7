import { z } from 'zod';

export const MailStatus = z.enum(['pending', 'sent', 'failed']);
export type MailStatus = z.infer<typeof MailStatus>;

/** One message of the site's outbox as an admin sees it (the body stays on the server: it may hold a link). */
export const OutboxMessage = z.object({
  id: z.number().int(),
  to: z.string(),
  subject: z.string(),
  kind: z.string(),
  status: MailStatus,
  attempts: z.number().int(),
  lastError: z.string().nullable(),
  nextAttemptAt: z.string().nullable(),
  createdAt: z.string(),
  sentAt: z.string().nullable(),
});
export type OutboxMessage = z.infer<typeof OutboxMessage>;

export const Outbox = z.object({ messages: z.array(OutboxMessage) });
export type Outbox = z.infer<typeof Outbox>;
