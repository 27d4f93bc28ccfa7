import type { ChangeStatus, SignatureMeaning } from '../../contracts/change-requests';

export const STATUS_LABELS: Record<ChangeStatus, string> = { proposed: 'Waiting for sign-off', approved: 'Approved and released', rejected: 'Rejected' };
export const STATUS_TONES: Record<ChangeStatus, 'warning' | 'success' | 'danger'> = { proposed: 'warning', approved: 'success', rejected: 'danger' };

export const MEANING_LABELS: Record<SignatureMeaning, string> = { reviewed: 'Reviewed', approved: 'Approved', rejected: 'Rejected' };

/** What each meaning commits the signer to, shown before they sign. */
export const MEANING_HINTS: Record<SignatureMeaning, string> = {
  reviewed: 'I checked the plan and its inputs. The request stays open for a decision.',
  approved: 'The plan becomes the recipe’s released setpoint from the stated date.',
  rejected: 'The recipe keeps its current setpoint; the request closes.',
};

export const utcTime = (iso: string) => `${iso.replace('T', ' ').slice(0, 19)} UTC`;
