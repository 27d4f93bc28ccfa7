import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { LotHistoryChart } from '@/components/charts/lot-history-chart';
import { EnzymeForm } from '@/components/lots/enzyme-form';
import { Button, Card, DataTable, EmptyState, ErrorState, Loader, Screen, Text, type Column } from '@/components/ui';
import type { LotHistoryPoint } from '@/contracts/enzymes';
import { can } from '@/contracts/permissions';
import { fmt } from '@/format';
import { useEnzyme } from '@/hooks/use-enzymes';
import { useIdParam } from '@/hooks/use-id-param';
import { useSession } from '@/hooks/use-session';

const STATUS = { quarantined: 'Quarantined', accepted: 'Accepted', rejected: 'Rejected' } as const;
const BASIS = { assay: 'Assay fit', certificate: 'Certificate', none: 'No figure at this temperature' } as const;

const COLUMNS: Column<LotHistoryPoint>[] = [
  { key: 'lot', label: 'Lot', value: (p) => p.lotCode, flex: 1.2 },
  { key: 'received', label: 'Received', value: (p) => p.receivedOn },
  { key: 'half', label: 'Half-life, h', value: (p) => (p.halfLifeH === null ? '–' : fmt(p.halfLifeH, 1)), isNumeric: true },
  {
    key: 'ci',
    label: '95 % interval, h',
    value: (p) => (p.lowerH === null || p.upperH === null ? '–' : `${fmt(p.lowerH, 1)}–${fmt(p.upperH, 1)}`),
    isNumeric: true,
  },
  { key: 'basis', label: 'Basis', value: (p) => BASIS[p.basis] },
  { key: 'status', label: 'Status', value: (p) => STATUS[p.status] },
];

function EnzymeBody({ id }: { id: number }) {
  const { session } = useSession();
  const { data, error, isLoading, retry } = useEnzyme(id);
  const [isEditing, setEditing] = useState(false);
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={4} label="Loading the enzyme" />;
  const e = data.enzyme;
  const canEdit = !!session && can(session.user.role, 'lots.edit');
  return (
    <>
      <Card>
        <Text variant="title" testID="enzyme-title">
          {e.name}
        </Text>
        <Text variant="small" tone="muted">
          {e.enzymeClass} (EC {e.ecNumber}) from {e.supplier}. Unit: {e.activityUnit} — {e.unitDefinition}. Reference temperature {fmt(e.tRefC, 0)} °C.
        </Text>
        <Text>
          Specification: half-life at least {fmt(e.specMinHalfLifeH, 1)} h at {fmt(e.specTempC, 0)} °C; activity at least {fmt(e.specMinActivity, 0)}{' '}
          {e.activityUnit}.
        </Text>
        {canEdit && !isEditing ? (
          <View style={styles.start}>
            <Button label="Edit specification and details" variant="secondary" compact onPress={() => setEditing(true)} testID="enzyme-edit" />
          </View>
        ) : null}
      </Card>
      {isEditing ? <EnzymeForm enzyme={e} onDone={() => setEditing(false)} onCancel={() => setEditing(false)} /> : null}
      <Card>
        <Text variant="title">Lot history</Text>
        {data.history.length ? (
          <>
            <Text variant="small" tone="muted">
              Filled dots: assay fit with its 95 % interval; hollow dots: certificate figure. Dashed line: the specification.
            </Text>
            <LotHistoryChart points={data.history} specMinHalfLifeH={e.specMinHalfLifeH} specTempC={e.specTempC} />
            <DataTable
              columns={COLUMNS}
              rows={data.history}
              rowKey={(p) => String(p.lotId)}
              caption="Lot history"
              testID="lot-history-table"
              onRowPress={(p) => router.push(`/lots/${p.lotId}`)}
            />
          </>
        ) : (
          <EmptyState title="No lots yet" message="Each lot of this enzyme will appear here with its half-life." />
        )}
      </Card>
    </>
  );
}

export default function EnzymeScreen() {
  const enzymeId = useIdParam();
  return (
    <Screen
      title="Enzyme"
      subtitle="Its specification and how its lots have measured up."
      testID="screen-enzyme"
      actions={<Button label="Enzyme library" variant="ghost" compact onPress={() => router.replace('/lots/enzymes')} />}
    >
      {enzymeId ? <EnzymeBody id={enzymeId} /> : <EmptyState title="No such enzyme" message="The address does not name an enzyme." />}
    </Screen>
  );
}

const styles = StyleSheet.create({ start: { alignSelf: 'flex-start' } });
