import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { PlanInputs } from '../../contracts/plans';
import type { RecipeDetail } from '../../contracts/recipes';
import { fmt } from '../../format';
import { useCreatePlan } from '../../hooks/use-create-plan';
import { useSession } from '../../hooks/use-session';
import { useUncertainty } from '../../hooks/use-uncertainty';
import { uncertaintyInput, type PlanEvaluation } from '../../planning';
import { radius, space, useBreakpoint, useColors } from '../../theme';
import { can } from '../../contracts/permissions';
import { CalibrationReview } from '../calibration/calibration-review';
import { EvidenceNote } from '../evidence/evidence-note';
import { Button, Card, EmptyState, Text } from '../ui';
import { ComparePanel, MAX_SCENARIOS, type Scenario } from './compare-panel';
import { PlanInputsPanel } from './plan-inputs-panel';
import { SavedPlans } from './saved-plans';
import { ProfileChart, ProfitChart, SetpointChart, TimeCharts } from './planner-charts';
import { UncertaintyPanel } from './uncertainty-panel';
import { usePlanner } from './use-planner';
import { useSiteFormat } from '../../hooks/use-site-format';

const SIDE_COLUMN = 360;

// The uncertainty result belongs to the inputs and evidence it ran on; any change (an accepted calibration) makes it stale.
const runKey = (inputs: PlanInputs, settings: unknown, evidence: { fitAssayId: number | null; calibrationId: number | null }) =>
  JSON.stringify({ ...inputs, uncertainty: settings, fit: evidence.fitAssayId, calibration: evidence.calibrationId });

function Recommendation({
  ev,
  inputs,
  canSave,
  isSaving,
  saveError,
  onSave,
  redrawMs,
  computeMs,
  hasUncertainty,
}: {
  ev: PlanEvaluation;
  inputs: PlanInputs;
  canSave: boolean;
  isSaving: boolean;
  saveError: string | null;
  onSave: () => void;
  redrawMs: number | null;
  computeMs: number;
  hasUncertainty: boolean;
}) {
  const o = ev.outputs;
  const site = useSiteFormat();
  const staged = o.strategy === 'staged' && o.stages;
  const gain = o.gainOverCurrent;
  return (
    <Card testID="recommendation">
      <Text variant="small" tone="muted">
        {staged ? `Recommended profile for a ${fmt(inputs.batchH, 0)} h batch` : `Recommended setpoint for a ${fmt(inputs.batchH, 0)} h batch`}
      </Text>
      <Text variant="figure" testID="recommended-setpoint" accessibilityLabel={`Recommended setpoint ${fmt(o.setpointC)} degrees Celsius`}>
        {staged ? o.stages!.map((s) => fmt(s.c)).join(' → ') : fmt(o.setpointC)} °C
      </Text>
      {o.earlyFinish ? (
        <>
          <Text testID="recommended-product">
            {fmt(o.predictedProductGPerL, 0)} g/L: all the substrate, converted by hour {fmt(o.earlyFinish.completeAtH)} of {fmt(inputs.batchH, 0)}
            {Math.abs(o.setpointC - o.current.setpointC) < 0.05 ? ' at the current setpoint, so no change is recommended' : ''} · {fmt(o.activityLeft * 100, 0)}{' '}
            % activity left
          </Text>
          <Text tone="primary" weight="semibold" testID="early-finish">
            A batch ended at hour {fmt(o.earlyFinish.completeAtH)} would earn {site.money(o.earlyFinish.shorterProfitPerH, 0)} per reactor hour, against{' '}
            {site.money(o.earlyFinish.fullProfitPerH, 0)} for the full {fmt(inputs.batchH, 0)} h.
          </Text>
        </>
      ) : (
        <Text testID="recommended-product">
          {fmt(o.predictedProductGPerL, 0)} g/L predicted with the heat-up ramp, {gain >= 0 ? `${fmt(gain * 100)} % more` : `${fmt(-gain * 100)} % less`} than{' '}
          {fmt(o.current.setpointC)} °C now · {fmt(o.activityLeft * 100, 0)} % activity left · profit {site.money(o.profitPerH, 0)} per reactor hour
        </Text>
      )}
      <EvidenceNote evidence={o.kinetics.evidence} showDisagreement testID="planner-evidence" />
      {o.atBound ? (
        <Text tone="warning" testID="caution-bound">
          Held at the vessel’s {o.atBound === 'upper' ? 'maximum' : 'minimum'} of {fmt(o.atBound === 'upper' ? o.boundsC[1] : o.boundsC[0])} °C: never planned
          beyond it.
        </Text>
      ) : null}
      {o.cautions.crossesBoiling ? (
        <Text tone="danger" testID="caution-pressure">
          Pressure caution: {fmt(o.cautions.maxC)} °C is above 100 °C. A water-based batch is then pressurised (about {fmt(o.cautions.saturationKPa, 0)} kPa
          absolute saturation pressure); follow the site’s pressure procedures.
        </Text>
      ) : null}
      {o.cautions.belowHygienicMin ? (
        <Text tone="warning" testID="caution-hygienic">
          Below the vessel’s hygienic minimum of {fmt(o.cautions.hygienicMinC)} °C: the batch must not sit there long.
        </Text>
      ) : null}
      {canSave ? (
        <>
          <Button label={hasUncertainty ? 'Save plan with its uncertainty' : 'Save plan'} onPress={onSave} isBusy={isSaving} testID="save-plan" />
          {saveError ? (
            <Text tone="danger" accessibilityLiveRegion="polite">
              {saveError}
            </Text>
          ) : null}
        </>
      ) : null}
      <Text variant="caption" tone="muted" testID="redraw-ms">
        Advisory: a setpoint change goes through change control.{redrawMs !== null ? ` Updated in ${fmt(redrawMs, 0)} ms (model ${fmt(computeMs, 0)} ms).` : ''}
      </Text>
    </Card>
  );
}

/**
 * The answer in one line, pinned to the top of the inputs on a phone so it can be seen moving while they are
 * edited (position sticky, which react-native-web passes to the page).
 */
function CompactRecommendation({ ev }: { ev: PlanEvaluation }) {
  const c = useColors();
  const site = useSiteFormat();
  const o = ev.outputs;
  const what = o.strategy === 'staged' && o.stages ? o.stages.map((s) => fmt(s.c)).join(' → ') : fmt(o.setpointC);
  return (
    <View
      style={[styles.compact, { backgroundColor: c.surfaceRaised, borderColor: c.border }]}
      testID="recommendation-compact"
      accessibilityLiveRegion="polite"
    >
      <Text weight="semibold">
        {what} °C · {fmt(o.predictedProductGPerL, 0)} g/L · {site.money(o.profitPerH, 0)}/h
      </Text>
      <Text variant="caption" tone="muted">
        Recommended now{o.atBound ? `, held at the vessel ${o.atBound === 'upper' ? 'maximum' : 'minimum'}` : ''}
      </Text>
    </View>
  );
}

/** The engineer's planner for one recipe: computed in the browser as the inputs change. */
export function RecipePlanner({ detail }: { detail: RecipeDetail }) {
  const planner = usePlanner(detail);
  const { inputs, settings, computed, ctx, redrawMs } = planner;
  const { isWide } = useBreakpoint();
  const { session } = useSession();
  const uncertainty = useUncertainty();
  const { submit: create, error: saveError, isBusy } = useCreatePlan();
  const [scenarios, setScenarios] = useState<Scenario[]>([]);

  if (!detail.lots.length || !ctx || !computed)
    return (
      <EmptyState title="No accepted lot" message={`${detail.enzyme.name} has no accepted lot to plan with. Procurement accepts lots on the Lots screen.`} />
    );
  const { ev, series, reasons } = computed;
  const key = runKey(inputs, settings, ctx.evidence);
  const run = uncertainty.run;
  const current = run.status === 'done' && run.key === key ? run.result : null;
  const lotNotAccepted = !detail.lots.some((l) => l.id === detail.recipe.lotId);

  const save = async () => {
    const plan = await create({ ...inputs, uncertainty: current ? settings : null });
    if (plan) router.push(`/planner/plan/${plan.id}`);
  };
  const addScenario = () => {
    const used = new Set(scenarios.map((s) => s.id));
    const id = ['A', 'B', 'C', 'D'].find((l) => !used.has(l))!;
    setScenarios([...scenarios, { id, inputs }]);
  };

  const recommendation = (
    <Recommendation
      ev={ev}
      inputs={inputs}
      canSave={!!session && can(session.user.role, 'plans.create')}
      isSaving={isBusy}
      saveError={saveError ? saveError.message : null}
      onSave={save}
      redrawMs={redrawMs}
      computeMs={computed.computeMs}
      hasUncertainty={!!current}
    />
  );
  const setpointChart = <SetpointChart ev={ev} series={series} inputs={inputs} uncertainty={current} />;
  const inputsPanel = <PlanInputsPanel detail={detail} planner={planner} />;
  const uncertaintyPanel = (
    <UncertaintyPanel
      planner={planner}
      ev={ev}
      run={run}
      current={current}
      onStart={() => uncertainty.start(uncertaintyInput(ctx, ev, settings, inputs.batchH), key)}
      onCancel={uncertainty.cancel}
    />
  );
  const reasonsCard = (
    <Card testID="reasons">
      <Text variant="title" accessibilityRole="header">
        Why
      </Text>
      {reasons.map((r) => (
        <Text key={r}>• {r}</Text>
      ))}
    </Card>
  );
  const role = session?.user.role;
  const calibration =
    role && can(role, 'calibrations.read') ? (
      <CalibrationReview recipeId={detail.recipe.id} lotId={inputs.lotId} canDecide={can(role, 'calibrations.decide')} />
    ) : null;
  const rest = (
    <>
      <TimeCharts ev={ev} series={series} inputs={inputs} />
      <ProfileChart ev={ev} series={series} inputs={inputs} />
      <ProfitChart ev={ev} series={series} inputs={inputs} />
      <ComparePanel
        detail={detail}
        scenarios={scenarios}
        canAdd={scenarios.length < MAX_SCENARIOS}
        onAdd={addScenario}
        onRemove={(id) => setScenarios(scenarios.filter((s) => s.id !== id))}
      />
      <SavedPlans recipeId={detail.recipe.id} />
    </>
  );
  const notice = lotNotAccepted ? (
    <Text tone="warning">
      The recipe’s lot {detail.recipe.lotCode} is no longer accepted; the planner uses an accepted lot of {detail.enzyme.name} instead.
    </Text>
  ) : null;

  // The calibration review spans the full width under the planner: its charts and tables need the room.
  if (isWide)
    return (
      <View style={styles.stack}>
        <View style={styles.columns}>
          <View style={styles.side}>
            {inputsPanel}
            {uncertaintyPanel}
          </View>
          <View style={styles.main}>
            {notice}
            {recommendation}
            {setpointChart}
            {reasonsCard}
            {rest}
          </View>
        </View>
        {calibration}
      </View>
    );
  // Phone: the answer and its chart first, then the inputs that move them.
  return (
    <View style={styles.stack}>
      {notice}
      {recommendation}
      {setpointChart}
      <View>
        <View style={styles.pinned}>
          <CompactRecommendation ev={ev} />
        </View>
        {inputsPanel}
      </View>
      {reasonsCard}
      {uncertaintyPanel}
      {calibration}
      {rest}
    </View>
  );
}

const styles = StyleSheet.create({
  columns: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  side: { width: SIDE_COLUMN, gap: space.lg },
  main: { flex: 1, minWidth: 0, gap: space.lg },
  stack: { gap: space.lg },
  pinned: { position: 'sticky', top: 0, zIndex: 2, marginBottom: space.sm } as object,
  compact: { borderWidth: 1, borderRadius: radius.md, paddingHorizontal: space.md, paddingVertical: space.sm, gap: space.xxs },
});
