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
  recipes: '/recipes',
  batches: '/batches',
  batchSettings: '/batches/settings',
  calibrationSettings: '/calibrations/settings',
} as const;

export const batchKey = (id: number) => `/batches/${id}`;

/** The control-system link (OPC UA): sources, their status, and a batch's link and gaps. */
export const linkKeys = { sources: '/control-link/sources', status: '/control-link/status', settings: '/control-link/settings' } as const;
export const batchLinkKey = (id: number) => `/control-link/batches/${id}`;

export const changeRequestsKey = (status?: string) => (status ? `/change-requests?status=${status}` : '/change-requests');
export const changeRequestKey = (id: number) => `/change-requests/${id}`;

export const recipeKey = (id: number) => `/recipes/${id}`;
export const plansKey = (recipeId: number) => `/plans?recipeId=${recipeId}`;
export const planKey = (id: number) => `/plans/${id}`;

/** The audit trail page for a filter. */
export const auditKey = (q: { action?: string; offset?: number }) =>
  `/audit-events?${new URLSearchParams({ ...(q.action ? { action: q.action } : {}), offset: String(q.offset ?? 0), limit: '50' })}`;

export const lotKey = (id: number) => `/lots/${id}`;
export const enzymeKey = (id: number) => `/enzymes/${id}`;
export const enzymesKey = (q: { q?: string; sort?: string; dir?: string; page?: number; pageSize?: number } = {}) => {
  const params = Object.entries(q)
    .filter(([, v]) => v !== undefined && v !== '')
    .map(([k, v]) => `${k}=${encodeURIComponent(String(v))}`);
  return params.length ? `/enzymes?${params.join('&')}` : '/enzymes';
};

/** A recipe and lot's calibration and model quality. */
export const calibrationKey = (recipeId: number, lotId: number) => `/calibrations?recipeId=${recipeId}&lotId=${lotId}`;
