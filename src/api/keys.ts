/** SWR keys: the API path of each resource, so a mutation revalidates exactly what it changed. */
export const keys = {
  session: '/session',
  site: '/site',
  users: '/users',
  vessels: '/vessels',
  enzymes: '/enzymes',
  lots: '/lots',
  billing: '/billing',
  invoices: '/billing/invoices',
  invites: '/invites',
  mailOutbox: '/mail-outbox',
} as const;

/** The audit trail page for a filter. */
export const auditKey = (q: { action?: string; offset?: number }) =>
  `/audit-events?${new URLSearchParams({ ...(q.action ? { action: q.action } : {}), offset: String(q.offset ?? 0), limit: '50' })}`;
