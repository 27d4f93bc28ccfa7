import { router } from 'expo-router';
import { useState } from 'react';
import type { Plan } from '../../contracts/plans';
import { fmt } from '../../format';
import { useProposeChange } from '../../hooks/use-propose-change';
import { Button, Card, Field, Text } from '../ui';

/** Today's date on the site's clock, YYYY-MM-DD. */
export const siteToday = (timeZone: string) =>
  new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date());

/** Proposes a saved plan as the recipe's setpoint; the server fixes the record hash on submission. */
export function ProposeForm({ plan, timeZone }: { plan: Plan; timeZone: string }) {
  const [rationale, setRationale] = useState('');
  const [expectedEffect, setExpectedEffect] = useState(
    `${fmt(plan.outputs.predictedProductGPerL)} g/L product instead of ${fmt(plan.outputs.current.productGPerL)} g/L (${fmt(plan.outputs.gainOverCurrent * 100)} %)`,
  );
  const [effectiveFrom, setEffectiveFrom] = useState(siteToday(timeZone));
  const { submit, error, isBusy } = useProposeChange();
  async function onSubmit() {
    const created = await submit({ planId: plan.id, rationale, expectedEffect, effectiveFrom });
    if (created) router.replace(`/sign-offs/${created.id}`);
  }
  return (
    <Card testID="propose-form">
      <Text>
        Plan #{plan.id} for {plan.recipeName}: {plan.outputs.stages ? 'staged profile' : `${fmt(plan.outputs.setpointC)} °C held`} instead of{' '}
        {fmt(plan.outputs.current.setpointC)} °C.
      </Text>
      <Field
        label="Rationale"
        value={rationale}
        onChangeText={setRationale}
        multiline
        error={error?.fields.rationale}
        hint="Why this change, for the supervisor and the record."
        testID="propose-rationale"
      />
      <Field label="Expected effect" value={expectedEffect} onChangeText={setExpectedEffect} error={error?.fields.expectedEffect} testID="propose-effect" />
      <Field
        label="Effective from (site date)"
        value={effectiveFrom}
        onChangeText={setEffectiveFrom}
        error={error?.fields.effectiveFrom}
        hint={`YYYY-MM-DD, ${timeZone}. Batches started from this date use the plan once it is approved.`}
        autoCapitalize="none"
        testID="propose-effective"
      />
      {error && !Object.keys(error.fields).length ? (
        <Text tone="danger" accessibilityLiveRegion="polite" testID="propose-error">
          {error.message}
        </Text>
      ) : null}
      <Button label="Send for sign-off" onPress={onSubmit} isBusy={isBusy} testID="propose-submit" />
    </Card>
  );
}
