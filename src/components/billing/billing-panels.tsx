import { useState } from 'react';
import { Linking, Platform, StyleSheet, View } from 'react-native';
import type { ApiError } from '../../api/client';
import type { BillingSummary, Invoice } from '../../contracts/billing';
import { isoDate, money } from '../../format';
import { useBuySeats } from '../../hooks/use-buy-seats';
import { useChangeSeats } from '../../hooks/use-change-seats';
import { space, useBreakpoint, useColors } from '../../theme';
import { Button, Card, DataTable, Field, Figure, Text, type Column } from '../ui';

/** 4900, 'eur' -> '49.00 EUR': amounts stay in the account's currency, with its code. */
const cents = (n: number, currency: string) => money(n / 100, currency);

const count = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

const STATUS_LABEL: Record<BillingSummary['status'], string> = { none: 'No paid plan', active: 'Paid up', past_due: 'Payment failed', canceled: 'Ended' };

export function PlanFigures({ b }: { b: BillingSummary }) {
  const { isWide } = useBreakpoint();
  return (
    <View style={[styles.figures, isWide && styles.figuresWide]}>
      <Figure label="paid seats" value={String(b.seats)} testID="billing-seats" />
      <Figure
        label={`in use (${count(b.activeUsers, 'person', 'people')}, ${count(b.pendingInvites, 'invite', 'invites')})`}
        value={String(b.seatsInUse)}
        testID="billing-seats-in-use"
      />
      <Figure label="free seats" value={String(Math.max(0, b.seats - b.seatsInUse))} testID="billing-seats-free" />
    </View>
  );
}

export function PlanCard({ b }: { b: BillingSummary }) {
  return (
    <Card testID="billing-plan">
      <Text variant="title">{b.plan}</Text>
      <Text testID="billing-status" tone={b.status === 'active' ? 'success' : b.status === 'none' ? 'muted' : 'danger'} weight="semibold">
        {STATUS_LABEL[b.status]}
      </Text>
      <Text tone="muted">
        {cents(b.unitAmountCents, b.currency)} per seat per month{b.currentPeriodEnd ? ` · this period ends ${isoDate(b.currentPeriodEnd)}` : ''}
      </Text>
    </Card>
  );
}

/** The failed-payment state, in the words an admin needs: what happened, until when, what to do. */
export function PaymentNotice({ b, openInvoiceUrl }: { b: BillingSummary; openInvoiceUrl: string | null }) {
  const c = useColors();
  if (b.status !== 'past_due' && b.status !== 'canceled') return null;
  const title = b.isReadOnly ? 'The site is read-only' : 'A payment failed';
  const body = b.isReadOnly
    ? b.status === 'canceled'
      ? 'The plan has ended. People can still sign in and read every record, but nothing can be changed until seats are bought again.'
      : `The grace period ended on ${isoDate(b.graceEndsAt ?? '')}. People can still sign in and read every record, but nothing can be changed until the open invoice is paid.`
    : `Everything keeps working until ${isoDate(b.graceEndsAt ?? '')}. If the open invoice is not paid by then, the site becomes read-only.`;
  return (
    <Card testID="billing-payment-notice" accessibilityRole="alert" style={{ borderColor: c.danger }}>
      <Text weight="semibold" tone="danger">
        {title}
      </Text>
      <Text>{body}</Text>
      {openInvoiceUrl ? <Button label="Pay the open invoice" testID="billing-pay-open" onPress={() => openExternal(openInvoiceUrl)} /> : null}
    </Card>
  );
}

/** Payment pages open in the same tab on the web, so the provider can send the admin back here. */
function openExternal(url: string) {
  if (Platform.OS === 'web') window.location.assign(url);
  else void Linking.openURL(url);
}

const errorFor = (e: ApiError | null, field: string) => e?.fields[field] ?? (e && !Object.keys(e.fields).length ? e.message : undefined);

/**
 * What adding seats costs: the full seat price now, also when the current month is partly over (the provider
 * does not prorate), then the new total each month.
 */
function buyHint(b: BillingSummary, n: number): string {
  const now = `${cents(n * b.unitAmountCents, b.currency)} now for ${count(n, 'seat', 'seats')}`;
  const partial = b.currentPeriodEnd ? `, the full month even though this period ends ${isoDate(b.currentPeriodEnd)}` : '';
  return `${now}${partial}; then ${cents((b.seats + n) * b.unitAmountCents, b.currency)} each month for ${b.seats + n} seats.`;
}

export function BuySeatsCard({ b }: { b: BillingSummary }) {
  const [count, setCount] = useState('1');
  const buy = useBuySeats();
  const n = Number(count);
  const valid = Number.isInteger(n) && n > 0;
  return (
    <Card testID="billing-buy">
      <Text variant="title" accessibilityRole="header">
        Buy seats
      </Text>
      <Text tone="muted">You pay on the payment page; the seats appear here as soon as the payment is confirmed.</Text>
      <Field
        label="Seats to add"
        testID="billing-buy-count"
        value={count}
        onChangeText={setCount}
        inputMode="numeric"
        keyboardType="number-pad"
        error={errorFor(buy.error, 'addSeats')}
        hint={valid ? buyHint(b, n) : undefined}
      />
      <Button
        label={valid ? `Pay for ${n} ${n === 1 ? 'seat' : 'seats'}` : 'Pay for seats'}
        testID="billing-buy-submit"
        isBusy={buy.isBusy}
        onPress={async () => {
          const out = await buy.submit({ addSeats: n });
          if (out) openExternal(out.url);
        }}
      />
    </Card>
  );
}

export function ReduceSeatsCard({ b }: { b: BillingSummary }) {
  const [count, setCount] = useState(String(b.seats));
  const change = useChangeSeats();
  const n = Number(count);
  return (
    <Card testID="billing-reduce">
      <Text variant="title" accessibilityRole="header">
        Reduce seats
      </Text>
      <Text tone="muted">
        Fewer seats bill from the next period. You cannot go below the {b.seatsInUse} seats in use: deactivate people or withdraw invites on the Site screen
        first.
      </Text>
      <Field
        label="New seat count"
        testID="billing-reduce-count"
        value={count}
        onChangeText={setCount}
        inputMode="numeric"
        keyboardType="number-pad"
        error={errorFor(change.error, 'seats')}
      />
      {change.error && change.error.fields.seats ? (
        <Text tone="danger" variant="small" testID="billing-reduce-error">
          {change.error.message}
        </Text>
      ) : null}
      <Button
        label="Set seat count"
        variant="secondary"
        testID="billing-reduce-submit"
        disabled={!b.canChangeSeats || !Number.isInteger(n) || n >= b.seats}
        isBusy={change.isBusy}
        onPress={() => void change.submit({ seats: n })}
      />
    </Card>
  );
}

const INVOICE_COLUMNS: Column<Invoice>[] = [
  { key: 'number', label: 'Invoice', value: (i) => i.number, flex: 1.2 },
  { key: 'issued', label: 'Issued', value: (i) => isoDate(i.issuedAt) },
  // A one-off charge for added seats has no period of its own.
  {
    key: 'period',
    label: 'Period',
    value: (i) => (i.periodStart === i.periodEnd ? `${isoDate(i.periodStart)}, seats added (one-off)` : `${isoDate(i.periodStart)} – ${isoDate(i.periodEnd)}`),
    flex: 1.6,
  },
  { key: 'seats', label: 'Seats', value: (i) => String(i.seats), isNumeric: true, flex: 0.6 },
  { key: 'amount', label: 'Amount', value: (i) => cents(i.amountDueCents, i.currency), isNumeric: true },
  { key: 'status', label: 'Status', value: (i) => (i.status === 'paid' ? 'Paid' : i.status === 'open' ? 'Unpaid' : i.status) },
];

export function InvoicesTable({ invoices }: { invoices: Invoice[] }) {
  return <DataTable columns={INVOICE_COLUMNS} rows={invoices} rowKey={(i) => String(i.id)} caption="Invoices" testID="billing-invoices" />;
}

const styles = StyleSheet.create({
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  figuresWide: { flexWrap: 'nowrap' },
});
