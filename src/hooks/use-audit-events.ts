import { auditKey } from '../api/keys';
import { AuditPage } from '../contracts/audit-events';
import { useResource } from './use-resource';

export const useAuditEvents = (q: { action?: string; offset?: number }) => useResource(auditKey(q), AuditPage);
