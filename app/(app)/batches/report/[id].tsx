import { router } from 'expo-router';
import { Linking, Platform, StyleSheet, View } from 'react-native';
import { Button, DataTable, ErrorState, Loader, Screen, Text, type Column } from '@/components/ui';
import type { Deviation, Reading } from '@/contracts/batches';
import { fmt } from '@/format';
import { useBatch } from '@/hooks/use-batches';
import { useIdParam } from '@/hooks/use-id-param';
import { useSiteFormat } from '@/hooks/use-site-format';
import { space } from '@/theme';

// The report states times on the site's clock with its zone, so a printed copy reads the same on every device.
const readingColumns = (stamp: (iso: string) => string): Column<Reading>[] => [
  { key: 't', label: 'Time', value: (r) => stamp(r.takenAt), flex: 1.4 },
  { key: 'h', label: 'Hour', value: (r) => fmt(r.h, 2), isNumeric: true },
  { key: 'c', label: '°C', value: (r) => fmt(r.c), isNumeric: true },
  { key: 'by', label: 'By', value: (r) => (r.source === 'historian' ? 'historian' : r.enteredBy) },
  { key: 'n', label: 'Note', value: (r) => r.note ?? '', flex: 1.4 },
];
const deviationColumns = (stamp: (iso: string) => string): Column<Deviation>[] => [
  { key: 't', label: 'When', value: (d) => stamp(d.at), flex: 1.2 },
  { key: 'k', label: 'Kind', value: (d) => d.kind.replace('_', ' ') },
  { key: 'm', label: 'What', value: (d) => d.message, flex: 2.5 },
  { key: 'a', label: 'Acknowledged', value: (d) => (d.acknowledgedBy ? `${d.acknowledgedBy}: ${d.acknowledgeComment}` : '—'), flex: 1.5 },
  { key: 'c', label: 'Closed', value: (d) => (d.closedBy ? `${d.closedBy}${d.closeComment ? `: ${d.closeComment}` : ''}` : '—'), flex: 1.2 },
];

function Row({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.row}>
      <Text variant="small" tone="muted" style={styles.label}>
        {label}
      </Text>
      <Text variant="small" style={styles.value}>
        {value}
      </Text>
    </View>
  );
}

function ReportBody({ id }: { id: number }) {
  const { data, error, isLoading, retry } = useBatch(id);
  const site = useSiteFormat();
  const stamp = site.stamp;
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={6} label="Loading the report" />;
  const { batch: b, status: s } = data;
  const p = b.program;
  return (
    <View style={styles.body} testID="batch-report-body">
      <View style={styles.actions} testID="report-actions">
        {Platform.OS === 'web' ? <Button label="Print" onPress={() => window.print()} testID="report-print" /> : null}
        <Button label="Download CSV" variant="secondary" onPress={() => void Linking.openURL(`/api/batches/${b.id}/report.csv`)} />
        <Button label="Back to the batch" variant="ghost" onPress={() => router.navigate(`/batches/${b.id}`)} />
      </View>
      <Text variant="title" accessibilityRole="header">
        Batch {b.id}: {b.recipeName}
      </Text>
      <Row label="Vessel · lot" value={`${b.vesselName} · ${b.lotCode}`} />
      <Row label="Started" value={`${stamp(b.startedAt)} by ${b.startedBy}`} />
      <Row label="Closed" value={b.closedAt ? `${stamp(b.closedAt)} by ${b.closedBy}${b.closeComment ? ` (${b.closeComment})` : ''}` : 'running'} />
      <Row
        label="Plan"
        value={`${p.source === 'released_plan' ? `released plan #${p.planId}` : 'recipe current setpoint'}: ${p.stages.map((x) => `${fmt(x.hours)} h at ${fmt(x.c)} °C`).join(', ')}; fill ${fmt(p.fillC, 0)} °C`}
      />
      <Row label="Kinetics from" value={p.evidence ? p.evidence.text : 'not recorded (started before Yieldpoint kept where kinetics came from)'} />
      <Row label="Planned product" value={`${fmt(p.plannedProductGPerL)} g/L${p.p10GPerL !== null ? ` (P10 ${fmt(p.p10GPerL)})` : ''}`} />
      <Row label="Limits" value={`band ±${data.settings.toleranceC} °C · gap ${data.settings.gapLimitMin} min · vessel max ${p.vessel.maxC} °C`} />
      <Row label="Activity left" value={`${fmt(s.activityLeft * 100, 1)} %`} />
      <Row label="Thermal dose" value={`${fmt(s.equivalentHAtRef, 2)} h equivalent at ${fmt(s.refC, 0)} °C`} />
      <Row label="Product so far · forecast" value={`${fmt(s.productSoFarGPerL)} · ${fmt(s.forecastGPerL)} g/L`} />
      <Row
        label="Forecast at closing · measured"
        value={`${b.forecastAtCloseGPerL === null ? '—' : fmt(b.forecastAtCloseGPerL)} · ${b.measuredProductGPerL === null ? '—' : fmt(b.measuredProductGPerL)} g/L`}
      />
      <Text variant="title" accessibilityRole="header">
        Signatures ({data.signatures.length})
      </Text>
      {data.signatures.length ? (
        data.signatures.map((g) => (
          <Row
            key={`${g.changeRequestId}-${g.signedAt}-${g.printedName}`}
            label={`${g.printedName} (${g.role})`}
            value={`${g.meaning} · ${stamp(g.signedAt)} · change request ${g.changeRequestId}${g.comment ? ` · “${g.comment}”` : ''}`}
          />
        ))
      ) : (
        <Text tone="muted">
          {p.source === 'released_plan'
            ? 'No signature found for the released plan.'
            : 'None: the batch runs the recipe’s current setpoint, not a released plan.'}
        </Text>
      )}
      <Text variant="title" accessibilityRole="header">
        Deviations ({data.deviations.length})
      </Text>
      {data.deviations.length ? (
        <DataTable columns={deviationColumns(stamp)} rows={data.deviations} rowKey={(d) => String(d.id)} caption="Deviations" />
      ) : (
        <Text tone="muted">None.</Text>
      )}
      <Text variant="title" accessibilityRole="header">
        Readings ({data.readingsTotal})
      </Text>
      {data.readingsTotal > 2000 ? (
        <Text tone="muted">{data.readingsTotal} readings: too many to print; the CSV holds them all.</Text>
      ) : (
        <DataTable columns={readingColumns(stamp)} rows={data.readings} rowKey={(r) => String(r.id)} caption="Readings" />
      )}
    </View>
  );
}

export default function BatchReportScreen() {
  const batchId = useIdParam();
  return (
    <Screen title="Batch report" subtitle="Recipe, plan, readings and deviations, for the batch record." testID="screen-batch-report">
      {batchId ? <ReportBody id={batchId} /> : <ErrorState error={new Error('No such batch')} />}
    </Screen>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  row: { flexDirection: 'row', gap: space.md, flexWrap: 'wrap' },
  label: { width: 200 },
  value: { flex: 1, minWidth: 180 },
});
