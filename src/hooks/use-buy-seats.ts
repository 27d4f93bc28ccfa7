import { api } from '../api/client';
import type { CheckoutStarted, BuySeats } from '../contracts/billing';
import { useMutation } from './use-mutation';

/** Opens a payment page for more seats; the caller sends the browser there. */
export const useBuySeats = () => useMutation((body: BuySeats) => api<CheckoutStarted>('/billing/checkout', { method: 'POST', body }), []);
