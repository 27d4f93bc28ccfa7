import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { UncertaintyResult } from '../../model/uncertainty';
import { fmt } from '../../format';
import { DEFAULT_ED_REL_SD, DEFAULT_LN_KD_SD, parameterCovariance, type PlanEvaluation } from '../../planning';
import { space } from '../../theme';
import { Button, Card, NumberField, ProgressBar, Text } from '../ui';
import type { UncertaintyRun } from '../../hooks/use-uncertainty';
import type { Planner } from './use-planner';

type Props = { planner: Planner; ev: PlanEvaluation; run: UncertaintyRun; current: UncertaintyResult | null; onStart: () => void; onCancel: () => void };

/** Monte Carlo settings, progress with Cancel, and the P10/P50/P90 it found. */
export function UncertaintyPanel({ planner, ev, run, current, onStart, onCancel }: Props) {
  const { settings, updateSettings, ctx } = planner;
  const on = useMemo(
    () => ({
      bias: (sensorBiasSdC: number) => updateSettings({ sensorBiasSdC }),
      spread: (v: number) => updateSettings({ doseRelSd: v / 100 }),
      draws: (v: number) => updateSettings({ draws: Math.round(v) }),
    }),
    [updateSettings],
  );
  const spread = ctx ? parameterCovariance(ctx).source : 'default';
  const isRunning = run.status === 'running';
  const at = current?.candidates.reduce((b, c) => (Math.abs(c.c - ev.outputs.setpointC) < Math.abs(b.c - ev.outputs.setpointC) ? c : b));
  return (
    <Card testID="uncertainty">
      <Text variant="title" accessibilityRole="header">
        Uncertainty
      </Text>
      <Text variant="small" tone="muted">
        {spread === 'fit'
          ? 'Lot parameters drawn jointly from the assay fit’s covariance.'
          : spread === 'calibration'
            ? 'Lot parameters drawn jointly from the accepted calibration’s covariance (kd and Ed; Vmax as calibrated).'
            : `This lot has no assay fit yet: kd at the reference temperature varies ±${Math.round(DEFAULT_LN_KD_SD * 100)} % and Ed ±${Math.round(DEFAULT_ED_REL_SD * 100)} % (one standard deviation, independent), a stated default.`}
      </Text>
      <View style={styles.grid}>
        <NumberField label="Sensor bias sd" unit="°C" value={settings.sensorBiasSdC} step={0.1} min={0} max={5} onChange={on.bias} testID="input-bias" />
        <NumberField
          label="Dose spread sd"
          unit="%"
          value={settings.doseRelSd * 100}
          step={1}
          min={0}
          max={50}
          decimals={0}
          onChange={on.spread}
          testID="input-dose-spread"
        />
        <NumberField label="Draws" value={settings.draws} step={1000} min={200} max={20000} decimals={0} onChange={on.draws} testID="input-draws" />
      </View>
      {isRunning ? (
        <View style={styles.running}>
          <ProgressBar value={run.progress} label="Uncertainty analysis progress" testID="uncertainty-progress" />
          <Text variant="small" tone="muted">
            {Math.round(run.progress * 100)} % of {settings.draws} draws
          </Text>
          <Button label="Cancel" variant="secondary" onPress={onCancel} testID="uncertainty-cancel" />
        </View>
      ) : (
        <Button label={current ? 'Run again' : 'Run uncertainty analysis'} variant="secondary" onPress={onStart} testID="uncertainty-run" />
      )}
      {run.status === 'cancelled' ? <Text tone="muted">Cancelled. Nothing was kept.</Text> : null}
      {run.status === 'failed' ? <Text tone="danger">{run.message}</Text> : null}
      {run.status === 'done' && !current ? <Text tone="warning">The inputs changed since the last run: run it again to see the band.</Text> : null}
      {current && at ? (
        <Text testID="uncertainty-result" accessibilityLiveRegion="polite">
          At {fmt(ev.outputs.setpointC)} °C held: P10 {fmt(at.p10, 0)}, P50 {fmt(at.p50, 0)}, P90 {fmt(at.p90, 0)} g/L over {current.draws} draws (seed{' '}
          {current.seed}).
          {current.robust ? ` The robust setpoint, with the best P10, is ${fmt(current.robust.setpointC)} °C (P10 ${fmt(current.robust.p10, 0)} g/L).` : ''}
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({ grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md }, running: { gap: space.sm } });
