import { useState } from 'react';
import { api } from '../api/client';
import type { AuditVerification } from '../contracts/audit-events';
import { useSubmit } from './use-submit';

/** Runs the chain check on demand; the answer is not cached because the point is to ask now. */
export function useVerifyAudit() {
  const [result, setResult] = useState<AuditVerification | null>(null);
  const check = useSubmit(async () => {
    const r = await api<AuditVerification>('/audit-events/verify');
    setResult(r);
    return r;
  }, []);
  return { ...check, result };
}
