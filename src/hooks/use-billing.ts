import { keys } from '../api/keys';
import { BillingSummary, InvoiceList } from '../contracts/billing';
import { useResource } from './use-resource';

export const useBilling = () => useResource(keys.billing, BillingSummary);
export const useInvoices = () => useResource(keys.invoices, InvoiceList);
