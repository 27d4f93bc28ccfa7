import { router } from 'expo-router';
import { View } from 'react-native';
import type { CalibrationBatchResult, CalibrationResult, DriftPoint } from '../../contracts/calibrations';
import { fmt } from '../../format';
import { ForecastAccuracyChart } from '../charts/forecast-accuracy-chart';
import { LineChart } from '../charts/line-chart';
import { Columns, DataTable, Text, type Column } from '../ui';

const BATCH_COLUMNS: Column<CalibrationBatchResult>[] = [
  { key: 'b', label: 'Batch', value: (b) => `#${b.batchId}` },
  { key: 'closed', label: 'Closed', value: (b) => b.closedAt.slice(0, 10), flex: 1.3 },
  { key: 'm', label: 'Measured g/L', value: (b) => fmt(b.measuredProductGPerL), isNumeric: true },
  { key: 'prior', label: 'Forecast before g/L', value: (b) => `${fmt(b.priorForecastGPerL)} ± ${fmt(b.priorSdGPerL)}`, isNumeric: true, flex: 1.3 },
  {
    key: 'loo',
    label: 'Leave-one-out after g/L',
    value: (b) => `${fmt(b.leaveOneOutForecastGPerL)} ± ${fmt(b.leaveOneOutSdGPerL)}`,
    isNumeric: true,
    flex: 1.3,
  },
  { key: 'r', label: 'Std. residual', value: (b) => `${fmt(b.standardisedResidual, 2)}${b.isOutlier ? ' (outlier)' : ''}`, isNumeric: true },
];

const DRIFT_COLUMNS: Column<DriftPoint>[] = [
  { key: 'n', label: 'Batches', value: (d) => (d.batchCount === 0 ? '0 (assay evidence)' : String(d.batchCount)), flex: 1.2 },
  { key: 'h', label: 't½ h (95 %)', value: (d) => `${fmt(d.halfLifeRefH)} (${fmt(d.halfLifeLowH)}–${fmt(d.halfLifeHighH)})`, isNumeric: true, flex: 1.4 },
  { key: 'ed', label: 'Ed kJ/mol (95 %)', value: (d) => `${fmt(d.edKJPerMol, 0)} (${fmt(d.edLow, 0)}–${fmt(d.edHigh, 0)})`, isNumeric: true, flex: 1.4 },
  {
    key: 'v',
    label: 'Vmax × (95 %)',
    value: (d) => `${d.vmaxScale.toFixed(3)} (${d.vmaxScaleLow.toFixed(3)}–${d.vmaxScaleHigh.toFixed(3)})`,
    isNumeric: true,
    flex: 1.4,
  },
];

/** Bias and RMSE of the forecasts before and after calibration, in one sentence. */
export function errorSentence(r: CalibrationResult): string {
  const n = r.batches.length;
  return `Over ${n} closed batch${n === 1 ? '' : 'es'}: forecast on the assay evidence alone bias ${fmt(r.before.biasGPerL)} g/L, RMSE ${fmt(r.before.rmseGPerL)} g/L; leave-one-out after calibration bias ${fmt(r.after.biasGPerL)} g/L, RMSE ${fmt(r.after.rmseGPerL)} g/L (forecast minus measured).`;
}

/**
 * A recipe and lot's model quality: forecast against measured for every closed batch (before calibration and
 * leave-one-out after), bias and RMSE, and the parameters' drift batch by batch with their 95 % bands; every chart
 * beside its table. Engineers see it with the proposal; supervisors with the change they sign.
 */
export function ModelQuality({ result: r, testID = 'model-quality' }: { result: CalibrationResult; testID?: string }) {
  const points = r.batches.flatMap((b) => [
    { id: b.batchId, forecastGPerL: b.priorForecastGPerL, measuredGPerL: b.measuredProductGPerL, group: 0 },
    { id: b.batchId, forecastGPerL: b.leaveOneOutForecastGPerL, measuredGPerL: b.measuredProductGPerL, group: 1 },
  ]);
  const d = r.drift;
  const first = d[0]!;
  const last = d.at(-1)!;
  const lifeSummary = `Half-life at the reference temperature ${fmt(first.halfLifeRefH)} h (95 % ${fmt(first.halfLifeLowH)}–${fmt(first.halfLifeHighH)}) on the assay evidence, ${fmt(last.halfLifeRefH)} h (95 % ${fmt(last.halfLifeLowH)}–${fmt(last.halfLifeHighH)}) after ${last.batchCount} batches.`;
  const vmaxSummary = `Vmax scale ${first.vmaxScale.toFixed(3)} (95 % ${first.vmaxScaleLow.toFixed(3)}–${first.vmaxScaleHigh.toFixed(3)}) before any batch, ${last.vmaxScale.toFixed(3)} (95 % ${last.vmaxScaleLow.toFixed(3)}–${last.vmaxScaleHigh.toFixed(3)}) after ${last.batchCount}.`;
  const sentence = errorSentence(r);
  return (
    <>
      <Text testID={`${testID}-errors`}>{sentence}</Text>
      <Columns>
        <View>
          <ForecastAccuracyChart
            points={points}
            label={sentence}
            groups={['Forecast on the assay evidence (before)', 'Leave-one-out after calibration']}
            xTitle="Forecast, g/L"
            testID={`${testID}-accuracy`}
          />
        </View>
        <LineChart
          title="Half-life at the reference temperature, batch by batch"
          summary={lifeSummary}
          series={[{ id: 'h', tone: 'primary', label: 'Half-life', points: d.map((p) => ({ x: p.batchCount, y: p.halfLifeRefH })) }]}
          bands={[{ id: 'hb', tone: 'primary', label: '95 % band', points: d.map((p) => ({ x: p.batchCount, lo: p.halfLifeLowH, hi: p.halfLifeHighH })) }]}
          xLabel="closed batches used"
          yLabel="t½, h"
          formatX={(v) => (Number.isInteger(v) ? String(v) : '')}
          testID={`${testID}-drift-life`}
        />
        <LineChart
          title="Catalytic scale (plant Vmax over the recipe’s), batch by batch"
          summary={vmaxSummary}
          series={[{ id: 'v', tone: 'accent', label: 'Vmax ×', points: d.map((p) => ({ x: p.batchCount, y: p.vmaxScale })) }]}
          bands={[{ id: 'vb', tone: 'accent', label: '95 % band', points: d.map((p) => ({ x: p.batchCount, lo: p.vmaxScaleLow, hi: p.vmaxScaleHigh })) }]}
          xLabel="closed batches used"
          yLabel="Vmax ×"
          formatX={(v) => (Number.isInteger(v) ? String(v) : '')}
          formatY={(v) => v.toFixed(2)}
          testID={`${testID}-drift-vmax`}
        />
      </Columns>
      <DataTable
        columns={BATCH_COLUMNS}
        rows={r.batches}
        rowKey={(b) => String(b.batchId)}
        caption="Forecast against measured, each closed batch"
        testID={`${testID}-batches`}
        onRowPress={(b) => router.push(`/batches/${b.batchId}`)}
      />
      <DataTable
        columns={DRIFT_COLUMNS}
        rows={d}
        rowKey={(p) => String(p.batchCount)}
        caption="Parameters after each closed batch"
        testID={`${testID}-drift`}
      />
      {r.leftOut.length ? (
        <Text variant="small" tone="muted" testID={`${testID}-left-out`}>
          Left out: {r.leftOut.map((l) => `#${l.batchId} (${l.reason}${l.by ? `, ${l.by}` : ''})`).join('; ')}.
        </Text>
      ) : null}
      <Text variant="caption" tone="muted">
        Measured product taken with a standard deviation of {fmt(r.measurementRelSd * 100)} % of its value (the site setting).
      </Text>
    </>
  );
}
