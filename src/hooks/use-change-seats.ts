import { api } from '../api/client';
import { keys } from '../api/keys';
import type { BillingSummary, ChangeSeats } from '../contracts/billing';
import { useMutation } from './use-mutation';

export const useChangeSeats = () => useMutation((body: ChangeSeats) => api<BillingSummary>('/billing/seats', { method: 'PATCH', body }), [keys.billing, keys.invoices]);
