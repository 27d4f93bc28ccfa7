import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { RecipeDetail } from '../../contracts/recipes';
import { fmt } from '../../format';
import { halfLifeFromKd } from '../../model/units';
import { lotKinetics } from '../../planning';
import { space } from '../../theme';
import { Card, Choice, NumberField, Text } from '../ui';
import type { Planner } from './use-planner';
import { useSiteFormat } from '../../hooks/use-site-format';

/** Above this a batch length is more likely a slip than a plan. Common practice, no source: enzymatic batches run hours to a few days. */
export const LONG_BATCH_H = 168;

/** Everything the engineer can change; each change recomputes the plan in the browser. */
export function PlanInputsPanel({ detail, planner }: { detail: RecipeDetail; planner: Planner }) {
  const site = useSiteFormat();
  const { inputs, update } = planner;
  const on = useMemo(
    () => ({
      batchH: (batchH: number) => update({ batchH }),
      turnaroundH: (turnaroundH: number) => update({ turnaroundH }),
      doseGPerL: (doseGPerL: number) => update({ doseGPerL }),
      currentSetpointC: (currentSetpointC: number) => update({ currentSetpointC }),
      s0GPerL: (s0GPerL: number) => update({ s0GPerL }),
      kmGPerL: (kmGPerL: number) => update({ kmGPerL }),
      productPricePerKg: (productPricePerKg: number) => update({ productPricePerKg }),
      enzymePricePerKg: (enzymePricePerKg: number) => update({ enzymePricePerKg }),
      heatingCostPerDegCHour: (heatingCostPerDegCHour: number) => update({ heatingCostPerDegCHour }),
      stages: (stages: number) => update({ stages: Math.round(stages) }),
      maxStepC: (maxStepC: number) => update({ maxStepC }),
    }),
    [update],
  );
  const { vessel, enzyme, recipe } = detail;
  return (
    <Card testID="plan-inputs">
      <Text variant="title" accessibilityRole="header">
        Inputs
      </Text>
      <Choice
        label="Enzyme lot (accepted lots only)"
        value={inputs.lotId}
        options={detail.lots.map((l) => ({
          value: l.id,
          label: `${l.lotCode} · t½ ${fmt(halfLifeFromKd(lotKinetics(recipe, enzyme.tRefC, l).kdRefPerH))} h`,
        }))}
        onChange={(lotId) => update({ lotId })}
        testID="input-lot"
      />
      <Text variant="caption" tone="muted">
        Half-life at {fmt(enzyme.tRefC, 0)} °C from each lot’s calibration, else its assay fit, else its certificate (moved to that temperature with the
        recipe’s Ed of {fmt(recipe.edKJPerMol, 0)} kJ/mol).
      </Text>
      <View style={styles.grid}>
        <NumberField label="Batch length" unit="h" value={inputs.batchH} step={2} min={1} max={500} onChange={on.batchH} testID="input-batchH" />
        <NumberField label="Turnaround" unit="h" value={inputs.turnaroundH} step={1} min={0} max={500} onChange={on.turnaroundH} testID="input-turnaroundH" />
        <NumberField
          label="Enzyme dose"
          unit="g/L"
          value={inputs.doseGPerL}
          step={0.05}
          min={0.01}
          max={1000}
          decimals={2}
          onChange={on.doseGPerL}
          testID="input-dose"
        />
        <NumberField
          label="Current setpoint"
          unit="°C"
          value={inputs.currentSetpointC}
          step={0.5}
          min={vessel.minC}
          max={vessel.maxC}
          onChange={on.currentSetpointC}
          testID="input-current"
        />
        <NumberField label="Substrate S0" unit="g/L" value={inputs.s0GPerL} step={10} min={1} max={2000} decimals={0} onChange={on.s0GPerL} testID="input-s0" />
        <NumberField label="Km" unit="g/L" value={inputs.kmGPerL} step={0.5} min={0.01} max={2000} decimals={2} onChange={on.kmGPerL} testID="input-km" />
        <NumberField
          label="Product price"
          unit={`${site.currency}/kg`}
          value={inputs.productPricePerKg}
          step={0.05}
          min={0}
          max={1e6}
          decimals={2}
          onChange={on.productPricePerKg}
          testID="input-product-price"
        />
        <NumberField
          label="Enzyme price"
          unit={`${site.currency}/kg`}
          value={inputs.enzymePricePerKg}
          step={1}
          min={0}
          max={1e6}
          decimals={2}
          onChange={on.enzymePricePerKg}
          testID="input-enzyme-price"
        />
        <NumberField
          label="Heating cost"
          unit={`${site.currency} per °C·h`}
          value={inputs.heatingCostPerDegCHour}
          step={0.1}
          min={0}
          max={1e6}
          decimals={2}
          onChange={on.heatingCostPerDegCHour}
          testID="input-heating"
        />
      </View>
      {inputs.batchH > LONG_BATCH_H ? (
        <Text tone="warning" weight="semibold" testID="caution-long-batch">
          A {fmt(inputs.batchH, 0)} h batch is {fmt(inputs.batchH / 24)} days: check the length (the model assumes the enzyme and substrate alone decide it;
          contamination and evaporation over that long are not in it).
        </Text>
      ) : null}
      <Choice
        label="Plan"
        value={inputs.strategy}
        options={[
          { value: 'isothermal', label: 'Hold one setpoint' },
          { value: 'staged', label: 'Rising stages' },
        ]}
        onChange={(strategy) => update({ strategy })}
        testID="input-strategy"
      />
      <View style={styles.grid}>
        <NumberField label="Stages" value={inputs.stages} step={1} min={2} max={8} decimals={0} onChange={on.stages} testID="input-stages" />
        <NumberField label="Largest step" unit="°C" value={inputs.maxStepC} step={0.5} min={0.5} max={30} onChange={on.maxStepC} testID="input-max-step" />
      </View>
      <Text variant="caption" tone="muted">
        {vessel.name}: {fmt(vessel.minC, 0)}–{fmt(vessel.maxC, 0)} °C, heats {fmt(vessel.maxHeatCPerH, 0)} °C/h, cools {fmt(vessel.maxCoolCPerH, 0)} °C/h,
        hygienic minimum {fmt(vessel.hygienicMinC, 0)} °C. Filled at {fmt(recipe.fillC, 0)} °C.
      </Text>
    </Card>
  );
}

const styles = StyleSheet.create({ grid: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md } });
