import { keys } from '../api/keys';
import type { BillingSummary, InvoiceList } from '../contracts/billing';
import { useResource } from './use-resource';

export const useBilling = () => useResource<BillingSummary>(keys.billing);
export const useInvoices = () => useResource<InvoiceList>(keys.invoices);
