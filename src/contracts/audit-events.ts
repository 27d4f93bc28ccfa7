import { z } from 'zod';

export const AuditEvent = z.object({
  id: z.number().int(),
  at: z.string(),
  actor: z.string(),
  action: z.string(),
  entity: z.string(),
  entityId: z.string().nullable(),
  oldValue: z.unknown().nullable(),
  newValue: z.unknown().nullable(),
  hash: z.string(),
  prevHash: z.string(),
});
export type AuditEvent = z.infer<typeof AuditEvent>;

const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}/, 'Use a date like 2026-12-01');

export const AuditQuery = z.object({
  action: z.string().max(80).optional(),
  actor: z.string().max(254).optional(),
  entity: z.string().max(80).optional(),
  from: isoDate.optional(),
  to: isoDate.optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
  offset: z.coerce.number().int().min(0).default(0),
});
export type AuditQuery = z.infer<typeof AuditQuery>;

export const AuditPage = z.object({ events: z.array(AuditEvent), total: z.number().int() });
export type AuditPage = z.infer<typeof AuditPage>;

export const AuditProblem = z.object({ kind: z.enum(['chain', 'checkpoint', 'record']), eventId: z.number().int().nullable(), message: z.string() });
export type AuditProblem = z.infer<typeof AuditProblem>;

/** The result of checking a site's trail: the links, the signed checkpoints, and decided records against their audited state. */
export const AuditVerification = z.object({
  ok: z.boolean(),
  events: z.number().int(),
  firstBrokenId: z.number().int().nullable(),
  checkpoints: z.number().int(),
  lastCheckpointAt: z.string().nullable(),
  problems: z.array(AuditProblem),
});
export type AuditVerification = z.infer<typeof AuditVerification>;

export const AuditCheckpoint = z.object({
  siteId: z.number().int().nullable(),
  events: z.number().int(),
  lastId: z.number().int(),
  head: z.string(),
  at: z.string(),
});
export const AuditCheckpointInput = z.strictObject({});
export const AuditCheckpointsWritten = z.object({ written: z.array(AuditCheckpoint) });
