import { api } from '../api/client';
import type { CheckoutStarted, BuySeats } from '../contracts/billing';
import { useSubmit } from './use-submit';

/** Opens a payment page for more seats; the caller sends the browser there. */
export const useBuySeats = () => useSubmit((body: BuySeats) => api<CheckoutStarted>('/billing/checkout', { method: 'POST', body }), []);
