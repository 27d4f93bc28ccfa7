import type { AuditEvent } from '../../contracts/audit-events';

// An audit event as a person reads it: who did what to which record. The stored action codes stay in the CSV.

const WHOLE: Record<string, string> = {
  'sign-in': 'signed in',
  'sign-out': 'signed out',
  'sign-in.failed': 'could not sign in',
  'access.denied': 'was refused access to',
  'access.denied.repeated': 'was refused access again to',
  'cautions.acknowledge': 'acknowledged the cautions',
  'plan.create': 'saved',
  'change-request.create': 'proposed',
  'change-request.supersede': 'closed as superseded',
  'change-request.stale': 'closed as stale',
  'signature.create': 'signed',
  'signature.refused': 'was refused a signature on',
  'calibration.refused': 'was refused a calibration for',
  'batch.reading': 'logged a reading on',
  'lot.certificate.upload': 'uploaded a certificate for',
  'billing.checkout.start': 'started a payment for',
  'billing.seats.request': 'asked for more seats on',
  'billing.payment.failed': 'saw a payment fail on',
  'billing.customer.create': 'opened',
  'billing.subscription.update': 'saw a change to',
  'mail.retry': 'sent again',
};

const VERB: Record<string, string> = {
  create: 'added',
  update: 'changed',
  release: 'released a new setpoint for',
  approve: 'approved',
  reject: 'rejected',
  raise: 'raised',
  acknowledge: 'acknowledged',
  close: 'closed',
  revoke: 'withdrew',
  accept: 'accepted',
  start: 'started',
  propose: 'proposed',
};

const words = (s: string) => s.replace(/[._-]+/g, ' ').trim();

/** "ops@site.example released a new setpoint for recipe 2". */
export function auditSentence(e: Pick<AuditEvent, 'actor' | 'action' | 'entity' | 'entityId'>): string {
  const last = e.action.split('.').at(-1) ?? e.action;
  const verb = WHOLE[e.action] ?? VERB[last] ?? words(e.action);
  const record = `${words(e.entity)}${e.entityId ? ` ${e.entityId}` : ''}`;
  // Signing in and the like name the person, not a record.
  const object = e.action.startsWith('sign-') || e.action === 'cautions.acknowledge' ? '' : ` ${record}`;
  return `${e.actor} ${verb}${object}`;
}

export type AuditChange = { field: string; before: string; after: string };

// A computed figure reads to four decimals (41.6659), an id or a count as it is, an instant on the site's clock
// with its zone (inside a nested record too); the CSV keeps the full value.
const ISO_INSTANT = /\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(?:\.\d+)?Z/g;
const raw = (v: unknown): string =>
  v === undefined || v === null
    ? '–'
    : typeof v === 'number' && !Number.isInteger(v)
      ? String(Number(v.toFixed(4)))
      : typeof v === 'object'
        ? JSON.stringify(v)
        : String(v);

/** How the site writes what a person reads: its currency and its clock. */
export type AuditSite = { currency: string; stamp: (iso: string) => string };
const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

// `setpointC` -> `setpoint (°C)`, `releasedPlanId` -> `released plan id`: the unit suffixes the records use;
// a price or cost names the site's currency (`productPricePerKg` -> `product price (EUR/kg)`).
const fieldName = (k: string, currency: string) =>
  words(
    k
      .replace(/PricePerKg$/, ` price (${currency}/kg)`)
      .replace(/CostPerDegCHour$/, ` cost (${currency} per °C·h)`)
      .replace(/GPerL$/, ' (g/L)')
      .replace(/(?<=[a-z])C$/, ' (°C)')
      .replace(/(?<=[a-z])H$/, ' (h)')
      .replace(/([a-z])([A-Z])/g, (_, a: string, b: string) => `${a} ${b.toLowerCase()}`),
  );

/** What an event changed, field by field: only the fields whose values differ, old -> new. */
export function auditChanges(e: Pick<AuditEvent, 'oldValue' | 'newValue'>, site: AuditSite): AuditChange[] {
  const { currency } = site;
  const show = (v: unknown) => raw(v).replace(ISO_INSTANT, (iso) => site.stamp(iso));
  const { oldValue: a, newValue: b } = e;
  if (a == null && b == null) return [];
  if (!isRecord(a) && !isRecord(b)) return show(a) === show(b) ? [] : [{ field: 'value', before: show(a), after: show(b) }];
  const before = isRecord(a) ? a : {};
  const after = isRecord(b) ? b : {};
  const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])];
  return keys
    .filter((k) => show(before[k]) !== show(after[k]))
    .map((k) => ({ field: fieldName(k, currency), before: k in before ? show(before[k]) : '–', after: k in after ? show(after[k]) : '–' }));
}
