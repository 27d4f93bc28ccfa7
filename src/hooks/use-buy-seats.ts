import { api } from '../api/client';
import { CheckoutStarted, type BuySeats } from '../contracts/billing';
import { useMutation } from './use-mutation';

/** Opens a payment page for more seats; the caller sends the browser there. */
export const useBuySeats = () => useMutation((body: BuySeats) => api('/billing/checkout', CheckoutStarted, { method: 'POST', body }), []);
