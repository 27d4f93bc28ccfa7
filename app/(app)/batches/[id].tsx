import { router } from 'expo-router';
import { useMemo, useState } from 'react';
import { Linking, StyleSheet, View } from 'react-native';
import { CloseBatchCard } from '@/components/batches/close-batch-card';
import { DeviationList } from '@/components/batches/deviation-list';
import { EvidenceNote } from '@/components/evidence/evidence-note';
import { HistorianUpload } from '@/components/batches/historian-upload';
import { ReadingPages, readingColumns, readingRow, type ReadingRow } from '@/components/batches/reading-pages';
import { LinkLine } from '@/components/batches/link-line';
import { ReadingEntry } from '@/components/batches/reading-entry';
import { StatusFigures } from '@/components/batches/status-figures';
import { BatchTemperatureChart } from '@/components/charts/batch-temperature-chart';
import { Button, CachedNote, Card, DataTable, ErrorState, Loader, Screen, Text } from '@/components/ui';
import { batchHours, batchStatus, durationText, readingsExplained } from '@/batches';
import type { BatchDetail } from '@/contracts/batches';
import { can } from '@/contracts/permissions';
import type { Role } from '@/contracts/roles';
import { fmt } from '@/format';
import { useBatch } from '@/hooks/use-batches';
import { useBatchLink } from '@/hooks/use-control-link';
import { useIdParam } from '@/hooks/use-id-param';
import { useLogReading } from '@/hooks/use-log-reading';
import { useSession } from '@/hooks/use-session';
import { useSiteFormat } from '@/hooks/use-site-format';
import { space, useBreakpoint } from '@/theme';

// The newest readings shown at once; a longer record pages below them.
const LATEST_SHOWN = 12;

/** The plan in words: what runs and where it comes from. */
function planSentence(d: BatchDetail): string {
  const p = d.batch.program;
  const what = p.stages.length === 1 ? `${fmt(p.stages[0].c)} °C` : `a staged profile ${p.stages.map((s) => fmt(s.c)).join(' → ')} °C`;
  const from = p.source === 'released_plan' ? `the released plan #${p.planId}` : 'the recipe’s current setpoint (no plan released)';
  return `Runs ${what} for ${fmt(p.batchH, 0)} h from ${from}, heated from the ${fmt(p.fillC, 0)} °C fill. Band ±${d.settings.toleranceC} °C; a reading at least every ${d.settings.gapLimitMin} min.`;
}

function BatchBody({ id }: { id: number }) {
  const { session } = useSession();
  const { isWide } = useBreakpoint();
  const site = useSiteFormat();
  // Readings arrive from the control system by themselves: while its link is up the batch is read again every few seconds.
  const [linkUp, setLinkUp] = useState(false);
  const { data, error, isLoading, retry, cachedAt } = useBatch(id, { refreshMs: linkUp ? 5000 : undefined });
  const link = useBatchLink(id, data?.batch.state === 'running');
  const isLinkUp = link.data?.link?.state === 'connected';
  // Set while rendering, not in an effect: React renders again at once, before anything is drawn with the old value.
  if (linkUp !== isLinkUp) setLinkUp(isLinkUp);
  const logger = useLogReading(id);
  const role: Role = session?.user.role ?? 'operator';

  // Readings still on the device count in a preview, so the operator sees their effect at once.
  const preview = useMemo(() => {
    if (!data) return null;
    const start = data.batch.startedAt;
    // A reading sent meanwhile may already be among the stored ones.
    const stored = new Set(data.readings.map((r) => r.key));
    const onDevice = logger.queued.filter((q) => !stored.has(q.key));
    const queued = onDevice.map((q) => ({ h: batchHours(start, q.takenAt), c: q.c, isQueued: true }));
    const all = [...data.readings.map((r) => ({ h: r.h, c: r.c, isQueued: false, isControl: r.source === 'control_system' })), ...queued].sort(
      (a, b) => a.h - b.h,
    );
    // A sampled historian record cannot be re-integrated here: then the server's figures stand until the readings arrive.
    const canPreview = queued.length > 0 && data.readings.length === data.readingsTotal;
    const status = canPreview
      ? { ...batchStatus(data.batch.program, all, batchHours(start, new Date().toISOString())), corrective: data.status.corrective }
      : data.status;
    const rows: ReadingRow[] = [
      ...data.readings.map(readingRow),
      ...onDevice.map((q) => ({ key: q.key, takenAt: q.takenAt, h: batchHours(start, q.takenAt), c: q.c, by: 'on this device', note: q.note ?? '' })),
      ...logger.refused.map(({ reading: q, message }) => ({
        key: q.key,
        takenAt: q.takenAt,
        h: batchHours(start, q.takenAt),
        c: q.c,
        by: 'not stored',
        note: message,
      })),
    ].sort((a, b) => Date.parse(a.takenAt) - Date.parse(b.takenAt));
    return { all, status, isPreview: canPreview || (cachedAt !== null && queued.length > 0), rows, count: data.status.readings + onDevice.length };
  }, [data, logger.queued, logger.refused, cachedAt]);

  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data || !preview) return <Loader rows={6} label="Loading the batch" />;
  const { batch: b, status } = data;
  const isRunning = b.state === 'running';
  const canLog = isRunning && can(role, 'readings.log');
  const canClose = isRunning && can(role, 'batches.close');
  const last = preview.all.at(-1) ?? null;
  const openDeviations = data.deviations.filter((d) => d.state !== 'closed').length;
  const nowH = batchHours(b.startedAt, data.now);
  const sinceLast = data.readings.length ? Date.parse(data.now) - Date.parse(data.readings[data.readings.length - 1].takenAt) : null;
  const overdue = isRunning && sinceLast !== null && sinceLast > data.settings.gapLimitMin * 60_000;
  const s = preview.status;
  const sentence = `${preview.count} readings. Planned now ${fmt(s.plannedNowC)} °C${last ? `, last logged ${fmt(last.c)} °C` : ''}. Activity left ${fmt(s.activityLeft * 100, 0)} %, product so far ${fmt(s.productSoFarGPerL)} g/L; if the plan is followed from now the batch ends with ${fmt(s.forecastGPerL)} g/L against ${fmt(s.plannedProductGPerL)} g/L planned.`;

  const entry = canLog ? (
    <ReadingEntry
      startedAt={b.startedAt}
      lastC={last ? last.c : null}
      vessel={{ name: b.vesselName, minC: b.program.vessel.minC, maxC: b.program.vessel.maxC }}
      logger={logger}
    />
  ) : null;
  const deviations = <DeviationList deviations={data.deviations} role={role} current={status.corrective} />;
  const chart = (
    <Card>
      <Text variant="title" accessibilityRole="header">
        Temperature against the plan
      </Text>
      <BatchTemperatureChart
        label={sentence}
        input={{
          plan: b.program.log,
          batchH: b.program.batchH,
          toleranceC: data.settings.toleranceC,
          readings: preview.all,
          gaps: (link.data?.gaps ?? []).map((g) => ({ fromH: batchHours(b.startedAt, g.fromAt), toH: batchHours(b.startedAt, g.toAt) })),
          gapLimitH: data.settings.gapLimitMin / 60,
          vesselMaxC: b.program.vessel.maxC,
          nowH: isRunning ? nowH : null,
        }}
      />
      <Text variant="small" testID="batch-sentence">
        {sentence}
      </Text>
      <View style={styles.explained} testID="readings-explained">
        {readingsExplained(preview.all, (rs) => batchStatus(b.program, rs, nowH).forecastGPerL).map((line) => (
          <Text key={line} variant="small" tone="muted">
            {line}
          </Text>
        ))}
      </View>
    </Card>
  );
  return (
    <>
      <Card>
        <Text variant="title" testID="batch-title">
          {b.recipeName} · {b.vesselName}
        </Text>
        <Text variant="small" tone={isRunning ? 'success' : 'muted'} weight="semibold" testID="batch-state">
          {isRunning
            ? `Running · hour ${fmt(Math.max(0, nowH))} of ${fmt(b.program.batchH, 0)}`
            : `Closed ${b.closedAt ? site.time(b.closedAt) : ''} by ${b.closedBy ?? '—'}`}
        </Text>
        <Text variant="small" tone="muted">
          Lot {b.lotCode} · started {site.time(b.startedAt)} by {b.startedBy}
        </Text>
        <Text variant="small" testID="batch-plan">
          {planSentence(data)}
        </Text>
        <EvidenceNote evidence={b.program.evidence} testID="batch-evidence" />
        {link.data?.link ? <LinkLine link={link.data.link} /> : null}
        {overdue ? (
          <Text variant="small" tone="warning" weight="semibold" testID="batch-overdue">
            No reading for {durationText(sinceLast!)}: the site asks for one every {data.settings.gapLimitMin} min.
          </Text>
        ) : null}
        {!isRunning ? (
          <Text variant="small" testID="batch-outcome">
            Forecast at closing {fmt(b.forecastAtCloseGPerL ?? NaN)} g/L · measured{' '}
            {b.measuredProductGPerL === null ? 'not recorded' : `${fmt(b.measuredProductGPerL)} g/L`}
          </Text>
        ) : null}
      </Card>
      {cachedAt !== null ? <CachedNote cachedAt={cachedAt} /> : null}
      {/* On a phone the entry comes first: logging is the job at the vessel. */}
      {isWide ? null : entry}
      <StatusFigures status={s} isPreview={preview.isPreview} />
      <View style={[styles.columns, isWide && styles.columnsWide]}>
        <View style={[styles.column, isWide && styles.columnWide]}>
          {isWide ? entry : null}
          {deviations}
        </View>
        <View style={[styles.column, isWide && styles.columnWide]}>
          {chart}
          <Card>
            <Text variant="title" accessibilityRole="header">
              Latest readings
            </Text>
            {logger.refused.length ? (
              <View style={styles.links}>
                <Text variant="small" tone="danger" testID="readings-refused">
                  {logger.refused.length} reading{logger.refused.length > 1 ? 's were' : ' was'} not stored: {logger.refused.map((r) => r.message).join(' ')}
                </Text>
                <Button label="Dismiss" variant="ghost" onPress={logger.dismissRefused} testID="readings-refused-dismiss" />
              </View>
            ) : null}
            {preview.rows.length ? (
              <DataTable
                columns={readingColumns(site.time)}
                rows={[...preview.rows].reverse().slice(0, LATEST_SHOWN)}
                rowKey={(r) => r.key}
                caption="Latest readings, newest first"
                testID="readings-table"
              />
            ) : (
              <Text tone="muted">No readings yet.</Text>
            )}
            {data.readingsTotal > LATEST_SHOWN ? <ReadingPages batchId={b.id} total={data.readingsTotal} /> : null}
            <View style={styles.links}>
              <Button label="Printable report" variant="secondary" onPress={() => router.push(`/batches/report/${b.id}`)} testID="batch-report" />
              <Button label="Download CSV" variant="ghost" onPress={() => void Linking.openURL(`/api/batches/${b.id}/report.csv`)} testID="batch-csv" />
            </View>
          </Card>
          {canLog ? <HistorianUpload batchId={b.id} siteTimeZone={session?.user.siteTimeZone ?? 'UTC'} /> : null}
          {canClose ? <CloseBatchCard batchId={b.id} status={status} openDeviations={openDeviations} /> : null}
        </View>
      </View>
    </>
  );
}

export default function BatchScreen() {
  const batchId = useIdParam();
  return (
    <Screen
      title="Batch"
      subtitle="Log the reactor temperature; the forecast follows."
      testID="screen-batch"
      actions={<Button label="All batches" variant="ghost" onPress={() => router.navigate('/batches')} testID="back-to-batches" />}
    >
      {batchId ? <BatchBody id={batchId} /> : <ErrorState error={new Error('No such batch')} />}
    </Screen>
  );
}

const styles = StyleSheet.create({
  columns: { gap: space.lg },
  columnsWide: { flexDirection: 'row', alignItems: 'flex-start' },
  column: { gap: space.lg },
  columnWide: { flex: 1 },
  links: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  explained: { gap: space.xxs },
});
