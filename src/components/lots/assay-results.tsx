import { Linking, StyleSheet, View } from 'react-native';
import type { Assay, AssayPoint, FitModelName, FitModelSummary } from '../../contracts/assays';
import { fmt } from '../../format';
import { space, useBreakpoint } from '../../theme';
import { ArrheniusChart } from '../charts/arrhenius-chart';
import { invT1000 } from '../charts/arrhenius-geometry';
import { DecayChart } from '../charts/decay-chart';
import { Button, Card, DataTable, Text, type Column } from '../ui';

const POINT_COLUMNS: Column<AssayPoint>[] = [
  { key: 'line', label: 'Line', value: (p) => String(p.line), isNumeric: true, flex: 0.6 },
  { key: 't', label: 'Temperature, °C', value: (p) => fmt(p.tempC, 1), isNumeric: true },
  { key: 'h', label: 'Time, h', value: (p) => String(p.timeH), isNumeric: true },
  { key: 'r', label: 'Residual (fraction)', value: (p) => fmt(p.residual, 3), isNumeric: true },
  { key: 'note', label: 'Note', value: (p) => p.note ?? '', flex: 1.4 },
];

// A table a person can read on screen; larger assays are in the chart and the CSV download.
const ROWS_SHOWN = 200;

type PerT = { c: number; kdPerH: number; se: number | null; n: number };
const ARRHENIUS_COLUMNS: Column<PerT>[] = [
  { key: 'c', label: 'Temperature, °C', value: (p) => fmt(p.c, 1), isNumeric: true },
  { key: 'x', label: '1000/T, 1/K', value: (p) => fmt(invT1000(p.c), 4), isNumeric: true },
  {
    key: 'kd',
    label: 'kd, 1/h (this temperature alone)',
    value: (p) => `${p.kdPerH.toPrecision(3)}${p.se ? ` ± ${p.se.toPrecision(2)}` : ''}`,
    isNumeric: true,
    flex: 1.4,
  },
  { key: 'ln', label: 'ln kd', value: (p) => (p.kdPerH > 0 ? fmt(Math.log(p.kdPerH), 3) : '–'), isNumeric: true },
  { key: 'n', label: 'Points', value: (p) => String(p.n), isNumeric: true, flex: 0.6 },
];

const MODEL_LABEL: Record<FitModelName, string> = {
  'first-order': 'First order',
  'first-order-a0': 'First order, activity lost before time 0',
  'two-fraction': 'Two fractions (labile and stable)',
};

// The models the fit compared on the same points; the lowest AICc is chosen unless a simpler one is within 2.
function modelColumns(chosen: FitModelName | undefined, tRefC: number): Column<FitModelSummary>[] {
  return [
    { key: 'model', label: 'Model', value: (m) => `${MODEL_LABEL[m.name]}${m.name === chosen ? ' (chosen)' : m.singular ? ' (not identified)' : ''}`, flex: 2 },
    { key: 'half', label: `t½ at ${fmt(tRefC, 0)} °C, h`, value: (m) => m.halfLifeRefH.toPrecision(3), isNumeric: true },
    { key: 'ed', label: 'Ed, kJ/mol', value: (m) => fmt(m.edKJPerMol, 0), isNumeric: true },
    { key: 'aicc', label: 'AICc', value: (m) => (m.aicc === null ? '–' : fmt(m.aicc, 1)), isNumeric: true },
  ];
}

/** One assay: the fitted figures, the decay and Arrhenius charts, and the same data as tables. */
export function AssayResults({ assay, specTempC }: { assay: Assay; specTempC: number }) {
  const { isWide } = useBreakpoint();
  const fit = assay.fit;
  const shown = assay.points.slice(0, ROWS_SHOWN);
  const points = assay.points.map((p) => ({ tempC: p.tempC, timeH: p.timeH, residual: p.residual }));
  return (
    <Card testID={`assay-${assay.id}`}>
      <Text variant="title">
        Assay of {assay.createdAt.slice(0, 10)} · {assay.pointCount} points
      </Text>
      <Text variant="small" tone="muted">
        {assay.source === 'csv' ? `From ${assay.fileName ?? 'a CSV file'}` : 'Typed in'} by {assay.createdBy}. {assay.scaleNote}
      </Text>
      {fit && assay.atSpec ? (
        <>
          <View style={styles.figures}>
            <Figure label={`Half-life at ${fmt(specTempC, 0)} °C`} value={`${fmt(assay.atSpec.halfLifeH, 1)} h`} testID="assay-half-life" />
            <Figure label="95 % interval" value={`${fmt(assay.atSpec.lowerH, 1)}–${fmt(assay.atSpec.upperH, 1)} h`} testID="assay-interval" />
            <Figure label={`kd at ${fmt(fit.tRefC, 0)} °C (ref.)`} value={`${fit.kdRefPerH.toPrecision(3)} ± ${fit.se.kdRefPerH.toPrecision(2)} /h`} />
            <Figure label="Ed, inactivation" value={`${fmt(fit.edKJPerMol, 0)} ± ${fmt(fit.se.edKJPerMol, 0)} kJ/mol`} />
          </View>
          {fit.models && fit.models.length > 0 ? (
            <DataTable
              columns={modelColumns(fit.chosen, fit.tRefC)}
              rows={fit.models}
              rowKey={(m) => m.name}
              caption="Models compared on the same points"
              testID="fit-models-table"
            />
          ) : null}
          {fit.lackOfFit ? (
            <Text tone="warning" testID="fit-lack-of-fit">
              {fit.lackOfFit}
            </Text>
          ) : null}
        </>
      ) : (
        <Text tone="warning" testID="assay-fit-problem">
          No fit: {assay.fitProblem ?? 'not enough data'}.
        </Text>
      )}
      <View style={[styles.charts, isWide && styles.chartsWide]}>
        <View style={isWide ? styles.chartWide : styles.chart}>
          <Text weight="semibold">Residual activity against time</Text>
          <DecayChart points={points} fit={fit} />
        </View>
        {fit ? (
          <View style={isWide ? styles.chartWide : styles.chart}>
            <Text weight="semibold">Arrhenius plot</Text>
            <ArrheniusChart input={{ perTemperature: fit.twoStep.perTemperature, fit }} />
          </View>
        ) : null}
      </View>
      {fit ? (
        <>
          <Text variant="small" tone="muted">
            Dots: each temperature fitted on its own. Dashed line: the one-step fit of all points
            {fit.twoStep.edKJPerMol !== null ? ` (the dots alone give Ed ${fmt(fit.twoStep.edKJPerMol, 0)} kJ/mol)` : ''}.
          </Text>
          <DataTable
            columns={ARRHENIUS_COLUMNS}
            rows={fit.twoStep.perTemperature}
            rowKey={(p) => String(p.c)}
            caption="Arrhenius plot as a table"
            testID="arrhenius-table"
          />
        </>
      ) : null}
      <Text weight="semibold">Measurements{shown.length < assay.pointCount ? ` (first ${shown.length} of ${assay.pointCount}; the CSV has all)` : ''}</Text>
      <DataTable columns={POINT_COLUMNS} rows={shown} rowKey={(p) => String(p.line)} caption="Assay measurements" testID="assay-points-table" />
      <View style={styles.start}>
        <Button label="Download as CSV" variant="secondary" compact onPress={() => Linking.openURL(`/api/lots/${assay.lotId}/assays/${assay.id}/csv`)} />
      </View>
    </Card>
  );
}

function Figure({ label, value, testID }: { label: string; value: string; testID?: string }) {
  return (
    <View style={styles.figure}>
      <Text variant="small" tone="muted">
        {label}
      </Text>
      <Text variant="title" testID={testID}>
        {value}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  start: { alignSelf: 'flex-start' },
  figures: { flexDirection: 'row', flexWrap: 'wrap', gap: space.lg },
  figure: { minWidth: 140, gap: space.xxs },
  charts: { gap: space.lg },
  chartsWide: { flexDirection: 'row' },
  chart: { gap: space.sm },
  chartWide: { flex: 1, gap: space.sm },
});
