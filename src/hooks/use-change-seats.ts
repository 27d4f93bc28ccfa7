import { api } from '../api/client';
import { keys } from '../api/keys';
import { BillingSummary, type ChangeSeats } from '../contracts/billing';
import { useMutation } from './use-mutation';

export const useChangeSeats = () => useMutation((body: ChangeSeats) => api('/billing/seats', BillingSummary, { method: 'PATCH', body }), [keys.billing, keys.invoices]);
