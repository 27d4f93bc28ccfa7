import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { LotForm } from '@/components/lots/lot-form';
import { Choice } from '@/components/ui/choice';
import { Button, DataTable, EmptyState, ErrorState, Loader, Screen, Text, type Column } from '@/components/ui';
import type { Lot, LotStatus } from '@/contracts/lots';
import { can } from '@/contracts/permissions';
import { fmt } from '@/format';
import { halfLifeFromKd } from '@/model/units';
import { useEnzymes } from '@/hooks/use-enzymes';
import { useLots } from '@/hooks/use-lots';
import { useSession } from '@/hooks/use-session';
import { space } from '@/theme';

const STATUS_LABEL: Record<LotStatus, string> = { quarantined: 'Quarantined, awaiting decision', accepted: 'Accepted', rejected: 'Rejected' };
const STATUS_TONE: Record<LotStatus, 'warning' | 'success' | 'danger'> = { quarantined: 'warning', accepted: 'success', rejected: 'danger' };

const COLUMNS: Column<Lot>[] = [
  { key: 'lot', label: 'Lot', value: (l) => l.lotCode, flex: 1.2, isCode: true },
  { key: 'enzyme', label: 'Enzyme', value: (l) => l.enzymeName, flex: 1.2 },
  { key: 'received', label: 'Received', value: (l) => l.receivedOn },
  {
    key: 'halfLife',
    label: 'Certificate half-life',
    value: (l) => `${fmt(halfLifeFromKd(l.certKdPerH))} h at ${fmt(l.certTempC, 0)} °C`,
    isNumeric: true,
    flex: 1.4,
  },
  { key: 'status', label: 'Status', value: (l) => STATUS_LABEL[l.status], flex: 1.3, tone: (l) => STATUS_TONE[l.status] },
];

const FILTERS = [
  { value: 'all', label: 'All' },
  { value: 'quarantined', label: 'Awaiting decision' },
  { value: 'accepted', label: 'Accepted' },
  { value: 'rejected', label: 'Rejected' },
] as const;

function LotsBody() {
  const { session } = useSession();
  const canEdit = !!session && can(session.user.role, 'lots.edit');
  const { data, error, isLoading, retry } = useLots();
  const enzymes = useEnzymes({ pageSize: 200 });
  const [filter, setFilter] = useState<(typeof FILTERS)[number]['value']>('all');
  const [isAdding, setAdding] = useState(false);
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={5} label="Loading lots" />;
  const waiting = data.lots.filter((l) => l.status === 'quarantined').length;
  const rows = filter === 'all' ? data.lots : data.lots.filter((l) => l.status === filter);
  return (
    <>
      <View style={styles.actions}>
        {canEdit ? <Button label={isAdding ? 'Close the form' : 'Register a lot'} onPress={() => setAdding(!isAdding)} testID="lot-add" /> : null}
        <Button label="Enzyme library" variant="secondary" onPress={() => router.push('/lots/enzymes')} testID="open-enzymes" />
      </View>
      {isAdding && enzymes.data ? (
        <LotForm
          enzymes={enzymes.data.enzymes}
          onDone={(lot) => {
            setAdding(false);
            router.push(`/lots/${lot.id}`);
          }}
        />
      ) : null}
      {!data.lots.length ? (
        <EmptyState title="No lots yet" message="Lots appear here when they are registered on receipt." />
      ) : (
        <>
          <Text tone="muted" testID="lots-summary">
            {data.lots.length} lots · {waiting} awaiting a decision
          </Text>
          <Choice compact label="Show" value={filter} options={FILTERS} onChange={setFilter} testID="lots-filter" />
          {rows.length ? (
            <DataTable
              columns={COLUMNS}
              rows={rows}
              rowKey={(l) => String(l.id)}
              caption="Enzyme lots"
              testID="lots-table"
              onRowPress={(l) => router.push(`/lots/${l.id}`)}
            />
          ) : (
            <EmptyState title="None here" message="No lot has this status." />
          )}
        </>
      )}
    </>
  );
}

export default function LotsScreen() {
  return (
    <Screen title="Lots" subtitle="Incoming enzyme lots and their stability against specification." testID="screen-lots">
      <LotsBody />
    </Screen>
  );
}

const styles = StyleSheet.create({ actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm } });
