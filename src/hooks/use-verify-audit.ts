import { useState } from 'react';
import { api, ApiError } from '../api/client';
import type { AuditVerification } from '../contracts/audit-events';

/** Runs the chain check on demand; the answer is not cached because the point is to ask now. */
export function useVerifyAudit() {
  const [result, setResult] = useState<AuditVerification | null>(null);
  const [error, setError] = useState<ApiError | null>(null);
  const [isBusy, setBusy] = useState(false);
  async function verify() {
    setBusy(true);
    setError(null);
    try {
      setResult(await api<AuditVerification>('/audit-events/verify'));
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'unknown', String(e)));
    } finally {
      setBusy(false);
    }
  }
  return { verify, result, error, isBusy };
}
