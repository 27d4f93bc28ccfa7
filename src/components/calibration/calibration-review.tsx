import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { Calibration, CalibrationBatchResult, DriftPoint } from '../../contracts/calibrations';
import { fmt } from '../../format';
import { useCalibration } from '../../hooks/use-calibration';
import { useAcceptCalibration, useExcludeBatch } from '../../hooks/use-decide-calibration';
import { space } from '../../theme';
import { Button, Card, DataTable, ErrorState, Field, Loader, Text, type Column } from '../ui';
import { ModelQuality } from './model-quality';

type ParamRow = { label: string; prior: string; proposed: string; accepted: string };

// drift[0] is the assay evidence (the prior), the last point the posterior from every batch used.
const life = (d: DriftPoint) => `${fmt(d.halfLifeRefH)} h (95 % ${fmt(d.halfLifeLowH)}–${fmt(d.halfLifeHighH)})`;
const ed = (d: DriftPoint) => `${fmt(d.edKJPerMol, 0)} kJ/mol (95 % ${fmt(d.edLow, 0)}–${fmt(d.edHigh, 0)})`;
const vmax = (d: DriftPoint) => `${d.vmaxScale.toFixed(3)} (95 % ${d.vmaxScaleLow.toFixed(3)}–${d.vmaxScaleHigh.toFixed(3)})`;

function paramRows(basis: Calibration, proposed: Calibration | null, accepted: Calibration | null): ParamRow[] {
  const p = basis.result.drift[0]!;
  const pr = proposed?.result.drift.at(-1);
  const ac = accepted?.result.drift.at(-1);
  return [
    { label: 'Half-life at the reference temperature', prior: life(p), proposed: pr ? life(pr) : '–', accepted: ac ? life(ac) : '–' },
    { label: 'Ed (inactivation)', prior: ed(p), proposed: pr ? ed(pr) : '–', accepted: ac ? ed(ac) : '–' },
    { label: 'Vmax scale (plant over recipe)', prior: vmax(p), proposed: pr ? vmax(pr) : '–', accepted: ac ? vmax(ac) : '–' },
  ];
}

const PARAM_COLUMNS = (hasProposed: boolean, hasAccepted: boolean): Column<ParamRow>[] => [
  { key: 'l', label: 'Parameter', value: (r) => r.label, flex: 1.3 },
  { key: 'p', label: 'Assay evidence only', value: (r) => r.prior, flex: 1.5 },
  ...(hasProposed ? [{ key: 'n', label: 'Proposed calibration', value: (r: ParamRow) => r.proposed, flex: 1.5 }] : []),
  ...(hasAccepted ? [{ key: 'a', label: 'In use now', value: (r: ParamRow) => r.accepted, flex: 1.5 }] : []),
];

/** An outlier batch with the engineer's explicit choice to leave it out, with a reason (audited by the server). */
function OutlierAction({
  batch,
  canDecide,
  onExclude,
  isBusy,
  error,
}: {
  batch: CalibrationBatchResult;
  canDecide: boolean;
  onExclude: (reason: string) => void;
  isBusy: boolean;
  error?: string;
}) {
  const [reason, setReason] = useState('');
  return (
    <View style={styles.outlier} testID={`outlier-${batch.batchId}`}>
      <Text tone="warning" weight="semibold">
        Batch #{batch.batchId} is an outlier: measured {fmt(batch.measuredProductGPerL)} g/L against {fmt(batch.leaveOneOutForecastGPerL)} g/L expected from the
        others (standardised residual {fmt(batch.standardisedResidual, 1)}). It stays in the calibration unless you leave it out.
      </Text>
      {canDecide ? (
        <>
          <Field
            label={`Why leave batch #${batch.batchId} out (recorded in the audit trail)`}
            value={reason}
            onChangeText={setReason}
            error={error}
            testID={`outlier-reason-${batch.batchId}`}
          />
          <View style={styles.row}>
            <Button
              label={`Leave batch #${batch.batchId} out`}
              variant="secondary"
              isBusy={isBusy}
              onPress={() => onExclude(reason)}
              testID={`outlier-exclude-${batch.batchId}`}
            />
          </View>
        </>
      ) : null}
    </View>
  );
}

/**
 * The engineer's review of a recipe and lot's calibration: the proposal beside the assay-only parameters, the
 * batches it used with outliers flagged, leaving a batch out with a reason, and Accept. Plans use a calibration
 * only once accepted. Supervisors and admins read it without the actions.
 */
export function CalibrationReview({ recipeId, lotId, canDecide }: { recipeId: number; lotId: number; canDecide: boolean }) {
  const { data, error, isLoading, retry } = useCalibration(recipeId, lotId);
  const accept = useAcceptCalibration();
  const exclude = useExcludeBatch();
  const [comment, setComment] = useState('');
  const body = (() => {
    if (error) return <ErrorState error={error} onRetry={retry} />;
    if (isLoading || !data) return <Loader rows={2} label="Loading the calibration" />;
    const { proposed, accepted } = data;
    const basis = proposed ?? accepted;
    if (!basis)
      return (
        <Text tone="muted" testID="calibration-empty">
          No closed batch of this recipe and lot has a measured product yet. Each batch closed with a lab result proposes a calibration here.
        </Text>
      );
    const outliers = proposed ? proposed.result.batches.filter((b) => b.isOutlier) : [];
    const takenOut = proposed ? proposed.result.leftOut.filter((l) => l.by !== null) : [];
    return (
      <>
        {proposed ? (
          <Text testID="calibration-proposed">
            Proposed {proposed.createdAt.slice(0, 10)} from {proposed.batchIds.length} closed batch{proposed.batchIds.length === 1 ? '' : 'es'} (
            {proposed.batchIds.map((id) => `#${id}`).join(', ')}). Prior: {proposed.result.prior.text}.
          </Text>
        ) : (
          <Text tone="muted" testID="calibration-none-proposed">
            No new proposal: the calibration in use covers every closed batch.
          </Text>
        )}
        <DataTable
          columns={PARAM_COLUMNS(!!proposed, !!accepted)}
          rows={paramRows(basis, proposed, accepted)}
          rowKey={(r) => r.label}
          caption="Parameters: assay evidence against the calibration"
          testID="calibration-params"
        />
        {outliers.map((b) => (
          <OutlierAction
            key={b.batchId}
            batch={b}
            canDecide={canDecide}
            isBusy={exclude.isBusy}
            error={exclude.error?.fields?.reason}
            onExclude={(reason) => void exclude.submit({ batchId: b.batchId, isExcluded: true, reason })}
          />
        ))}
        {exclude.error && !exclude.error.fields?.reason ? <Text tone="danger">{exclude.error.message}</Text> : null}
        {canDecide && takenOut.length ? (
          <View style={styles.row}>
            {takenOut.map((l) => (
              <Button
                key={l.batchId}
                label={`Take batch #${l.batchId} back in`}
                variant="ghost"
                isBusy={exclude.isBusy}
                onPress={() => void exclude.submit({ batchId: l.batchId, isExcluded: false, reason: `Taken back in after review of: ${l.reason}` })}
                testID={`calibration-include-${l.batchId}`}
              />
            ))}
          </View>
        ) : null}
        {proposed && canDecide ? (
          <View style={styles.decide}>
            <Field label="Comment (optional, recorded with the acceptance)" value={comment} onChangeText={setComment} testID="calibration-comment" />
            <View style={styles.row}>
              <Button
                label="Accept this calibration for planning"
                isBusy={accept.isBusy}
                onPress={() => void accept.submit(proposed.id, comment.trim() ? { comment } : {})}
                testID="calibration-accept"
              />
            </View>
            {accept.error ? <Text tone="danger">{accept.error.message}</Text> : null}
            <Text variant="caption" tone="muted">
              Plans, batch programs and corrective setpoints use it from then on; plans saved before say they were computed on older evidence.
            </Text>
          </View>
        ) : null}
        <ModelQuality result={basis.result} />
      </>
    );
  })();
  return (
    <Card testID="calibration-review">
      <Text variant="title" accessibilityRole="header">
        Calibration from closed batches
      </Text>
      {data ? (
        <Text variant="small" testID="calibration-in-use">
          <Text variant="small" weight="semibold">
            In use now:{' '}
          </Text>
          {data.inUse}
        </Text>
      ) : null}
      {body}
    </Card>
  );
}

const styles = StyleSheet.create({
  outlier: { gap: space.sm },
  decide: { gap: space.sm },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
