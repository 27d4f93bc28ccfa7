import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { BatchCard } from '@/components/batches/batch-card';
import { DeviationRulesCard } from '@/components/batches/deviation-rules-card';
import { ForecastAccuracyChart } from '@/components/charts/forecast-accuracy-chart';
import { forecastAccuracyGeometry } from '@/components/charts/forecast-accuracy-geometry';
import { Button, Card, EmptyState, ErrorState, Loader, Screen, Text } from '@/components/ui';
import type { BatchSummary } from '@/contracts/batches';
import { can } from '@/contracts/permissions';
import { fmt } from '@/format';
import { useBatches } from '@/hooks/use-batches';
import { useSession } from '@/hooks/use-session';
import { space, useBreakpoint } from '@/theme';

function Section({ title, batches, now, testID, empty }: { title: string; batches: BatchSummary[]; now: Date; testID: string; empty?: string }) {
  if (!batches.length && !empty) return null;
  return (
    <View style={styles.section} testID={testID}>
      <Text variant="title" accessibilityRole="header">
        {title}
      </Text>
      {batches.length ? batches.map((b) => <BatchCard key={b.id} b={b} now={now} />) : <Text tone="muted">{empty}</Text>}
    </View>
  );
}

function Accuracy({ closed }: { closed: BatchSummary[] }) {
  const points = closed
    .filter((b) => b.measuredProductGPerL !== null)
    .map((b) => ({ id: b.id, forecastGPerL: b.forecastGPerL, measuredGPerL: b.measuredProductGPerL! }));
  if (!points.length) return null;
  const bias = forecastAccuracyGeometry(points, 1, 1).meanBias!;
  const worst = Math.max(...points.map((p) => Math.abs(p.measuredGPerL / p.forecastGPerL - 1)));
  const sentence = `Across ${points.length} closed batches with a lab result, measured product was on average ${fmt(Math.abs(bias) * 100)} % ${bias >= 0 ? 'above' : 'below'} the forecast at closing; the largest miss was ${fmt(worst * 100)} %.`;
  return (
    <Card testID="forecast-accuracy">
      <Text variant="title" accessibilityRole="header">
        How good are the forecasts?
      </Text>
      <ForecastAccuracyChart points={points} label={sentence} />
      <Text variant="small" testID="forecast-accuracy-sentence">
        {sentence}
      </Text>
    </Card>
  );
}

function BatchesBody() {
  const { session } = useSession();
  const { isWide } = useBreakpoint();
  const { data, error, isLoading, retry } = useBatches();
  const canStart = !!session && can(session.user.role, 'batches.start');
  const start = canStart ? (
    <View style={styles.start}>
      <Button label="Start a batch" onPress={() => router.push('/batches/start')} testID="start-batch" />
    </View>
  ) : null;
  if (error) return <ErrorState error={error} onRetry={retry} />;
  if (isLoading || !data) return <Loader rows={4} label="Loading batches" />;
  if (!data.batches.length)
    return (
      <EmptyState
        title="No batches yet"
        message="A batch appears here when a supervisor or engineer starts it on a vessel with an accepted lot."
        action={start}
      />
    );
  const now = new Date();
  const running = data.batches.filter((b) => b.state === 'running');
  const closed = data.batches.filter((b) => b.state === 'closed');
  return (
    <>
      {start}
      <View style={[styles.columns, isWide && styles.columnsWide]}>
        <View style={[styles.column, isWide && styles.columnWide]}>
          <Section
            title="My batches"
            batches={running.filter((b) => b.isMine)}
            now={now}
            testID="my-batches"
            empty="None yet: batches you start or log readings on come here first."
          />
          <Section title="Other running batches" batches={running.filter((b) => !b.isMine)} now={now} testID="other-batches" />
        </View>
        <View style={[styles.column, isWide && styles.columnWide]}>
          <Section title="Closed batches" batches={closed} now={now} testID="closed-batches" />
          {/* After the batches it summarises; on a phone the running batches and their history come first. */}
          <Accuracy closed={closed} />
          {/* Last: it loads on its own, and below everything it moves nothing when it arrives. */}
          <DeviationRulesCard canChange={!!session && can(session.user.role, 'batches.settings')} />
        </View>
      </View>
    </>
  );
}

export default function BatchesScreen() {
  return (
    <Screen title="Batches" subtitle="Running batches: log the reactor temperature and follow the forecast." testID="screen-batches">
      <BatchesBody />
    </Screen>
  );
}

const styles = StyleSheet.create({
  columns: { gap: space.xl },
  columnsWide: { flexDirection: 'row', alignItems: 'flex-start' },
  column: { gap: space.xl },
  columnWide: { flex: 1 },
  section: { gap: space.sm },
  start: { alignSelf: 'flex-start' },
});
