import { RoleGate } from '@/components/shell/role-gate';
import { DataTable, EmptyState, ErrorState, Loader, Screen, Text, type Column } from '@/components/ui';
import type { Lot } from '@/contracts/lots';
import { fmt, halfLifeH } from '@/format';
import { useLots } from '@/hooks/use-lots';

const STATUS_LABEL: Record<Lot['status'], string> = { quarantined: 'Awaiting decision', accepted: 'Accepted', rejected: 'Rejected' };

const COLUMNS: Column<Lot>[] = [
  { key: 'lot', label: 'Lot', value: (l) => l.lotCode, flex: 1.2 },
  { key: 'enzyme', label: 'Enzyme', value: (l) => l.enzymeName, flex: 1.2 },
  { key: 'received', label: 'Received', value: (l) => l.receivedOn },
  { key: 'halfLife', label: 'Certificate half-life', value: (l) => `${fmt(halfLifeH(l.certKdPerH))} h at ${fmt(l.certTempC, 0)} °C`, isNumeric: true, flex: 1.4 },
  { key: 'status', label: 'Status', value: (l) => STATUS_LABEL[l.status] },
];

function LotsBody() {
  const { data, error, isLoading, retry } = useLots();
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={5} label="Loading lots" />;
  if (!data.lots.length) return <EmptyState title="No lots yet" message="Lots appear here when they are registered on receipt." />;
  const waiting = data.lots.filter((l) => l.status === 'quarantined').length;
  return (
    <>
      <Text tone="muted" testID="lots-summary">
        {data.lots.length} lots · {waiting} awaiting a decision
      </Text>
      <DataTable columns={COLUMNS} rows={data.lots} rowKey={(l) => String(l.id)} caption="Enzyme lots" testID="lots-table" />
    </>
  );
}

export default function LotsScreen() {
  return (
    <RoleGate name="lots">
      <Screen title="Lots" subtitle="Incoming enzyme lots and their stability against specification." testID="screen-lots">
        <LotsBody />
      </Screen>
    </RoleGate>
  );
}
