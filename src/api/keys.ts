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
