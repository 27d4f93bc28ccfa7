import type { ChangeStatus, SignatureMeaning } from '../../contracts/change-requests';

export const STATUS_LABELS: Record<ChangeStatus, string> = {
  proposed: 'Waiting for sign-off',
  approved: 'Approved and released',
  rejected: 'Rejected',
  superseded: 'Superseded',
  stale: 'Stale',
};
export const STATUS_TONES: Record<ChangeStatus, 'warning' | 'success' | 'danger' | 'muted'> = {
  proposed: 'warning',
  approved: 'success',
  rejected: 'danger',
  superseded: 'muted',
  stale: 'muted',
};

/** Why a request closed without a decision of its own. */
export const closedBecause = (status: ChangeStatus, by: number | null) =>
  status === 'superseded'
    ? `A newer request for the same recipe (#${by}) replaced this one; it can no longer be signed.`
    : status === 'stale'
      ? `Request #${by} for the same recipe was released, so this one compares against a setpoint that no longer runs; it can no longer be signed. Propose again from a current plan if it is still wanted.`
      : null;

export const MEANING_LABELS: Record<SignatureMeaning, string> = { reviewed: 'Reviewed', approved: 'Approved', rejected: 'Rejected' };

/** What each meaning commits the signer to, shown before they sign. */
export const MEANING_HINTS: Record<SignatureMeaning, string> = {
  reviewed: 'I checked the plan and its inputs. The request stays open for a decision.',
  approved: 'The plan becomes the recipe’s released setpoint from the stated date.',
  rejected: 'The recipe keeps its current setpoint; the request closes.',
};

export const utcTime = (iso: string) => `${iso.replace('T', ' ').slice(0, 19)} UTC`;
