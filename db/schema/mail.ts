import { index, integer, sqliteTable, text } from 'drizzle-orm/sqlite-core';
import { createdAt, sites } from './core';

export const MAIL_STATUSES = ['pending', 'sent', 'failed'] as const;

// Written inside the transaction of the decision it reports, so a mail failure never loses the decision;
// the sender delivers rows later and keeps retrying (nextAttemptAt) until it gives up (failed).
export const mailOutbox = sqliteTable(
  'mail_outbox',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    siteId: integer('site_id').references(() => sites.id),
    to: text('to').notNull(),
    subject: text('subject').notNull(),
    text: text('text').notNull(),
    html: text('html'),
    kind: text('kind').notNull(),
    status: text('status', { enum: MAIL_STATUSES }).notNull().default('pending'),
    attempts: integer('attempts').notNull().default(0),
    lastError: text('last_error'),
    nextAttemptAt: text('next_attempt_at').notNull(),
    createdAt: createdAt(),
    sentAt: text('sent_at'),
  },
  (t) => [index('mail_outbox_due_idx').on(t.status, t.nextAttemptAt), index('mail_outbox_site_idx').on(t.siteId, t.id)],
);
