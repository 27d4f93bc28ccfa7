import { auditKey } from '../api/keys';
import type { AuditPage } from '../contracts/audit-events';
import { useResource } from './use-resource';

export const useAuditEvents = (q: { action?: string; offset?: number }) => useResource<AuditPage>(auditKey(q));
