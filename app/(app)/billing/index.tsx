import { useLocalSearchParams } from 'expo-router';
import { BuySeatsCard, InvoicesTable, PaymentNotice, PlanCard, PlanFigures, ReduceSeatsCard } from '@/components/billing/billing-panels';
import { Card, Columns, EmptyState, ErrorState, Loader, Screen, Text } from '@/components/ui';
import { useBilling, useInvoices } from '@/hooks/use-billing';

function ReturnNotice() {
  const { checkout } = useLocalSearchParams<{ checkout?: string }>();
  if (checkout !== 'done' && checkout !== 'canceled') return null;
  return (
    <Card testID={`billing-return-${checkout}`} accessibilityRole="alert">
      <Text weight="semibold" tone={checkout === 'done' ? 'success' : 'default'}>
        {checkout === 'done' ? 'Payment received' : 'Payment cancelled'}
      </Text>
      <Text tone="muted">
        {checkout === 'done' ? 'The seat count below is the one the payment provider has confirmed.' : 'Nothing was charged and the seat count is unchanged.'}
      </Text>
    </Card>
  );
}

function BillingBody() {
  const billing = useBilling();
  const invoices = useInvoices();
  if (billing.error) return <ErrorState error={billing.error} onRetry={billing.retry} />;
  if (!billing.data) return <Loader rows={3} label="Loading the plan" />;
  const b = billing.data;
  const openInvoice = invoices.data?.invoices.find((i) => i.payUrl) ?? null;
  return (
    <>
      <ReturnNotice />
      <PaymentNotice b={b} openInvoiceUrl={openInvoice?.payUrl ?? null} />
      <PlanCard b={b} />
      <PlanFigures b={b} />
      <Columns>
        <BuySeatsCard b={b} />
        {b.canChangeSeats ? <ReduceSeatsCard key={b.seats} b={b} /> : null}
      </Columns>
      <Text variant="title" accessibilityRole="header">
        Invoices
      </Text>
      {invoices.error ? (
        <ErrorState error={invoices.error} onRetry={invoices.retry} />
      ) : !invoices.data ? (
        <Loader rows={2} label="Loading invoices" />
      ) : invoices.data.invoices.length === 0 ? (
        <EmptyState title="No invoices yet" message="Invoices appear here once the first payment goes through." />
      ) : (
        <InvoicesTable invoices={invoices.data.invoices} />
      )}
    </>
  );
}

export default function BillingScreen() {
  return (
    <Screen title="Billing" subtitle="Licence seats, payments and invoices." testID="screen-billing">
      <BillingBody />
    </Screen>
  );
}
