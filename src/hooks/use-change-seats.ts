import { api } from '../api/client';
import { keys } from '../api/keys';
import type { BillingSummary, ChangeSeats } from '../contracts/billing';
import { useSubmit } from './use-submit';

export const useChangeSeats = () =>
  useSubmit((body: ChangeSeats) => api<BillingSummary>('/billing/seats', { method: 'PATCH', body }), [keys.billing, keys.invoices]);
