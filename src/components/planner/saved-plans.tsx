import { router } from 'expo-router';
import { fmt } from '../../format';
import { usePlans } from '../../hooks/use-plans';
import { Button, Card, ErrorState, Loader, Text } from '../ui';
import { useSiteFormat } from '../../hooks/use-site-format';

/** Plans saved for this recipe, newest first; each opens its printable sheet. */
export function SavedPlans({ recipeId }: { recipeId: number }) {
  const site = useSiteFormat();
  const { data, error, isLoading, retry } = usePlans(recipeId);
  return (
    <Card testID="saved-plans">
      <Text variant="title" accessibilityRole="header">
        Saved plans
      </Text>
      {error ? (
        <ErrorState error={error} onRetry={retry} />
      ) : isLoading || !data ? (
        <Loader rows={1} label="Loading saved plans" />
      ) : !data.plans.length ? (
        <Text tone="muted">None yet. A saved plan is recomputed by the server and can then be proposed through change control.</Text>
      ) : (
        data.plans.slice(0, 10).map((p) => {
          const o = p.outputs;
          const what = o.stages ? o.stages.map((s) => fmt(s.c)).join('→') : fmt(o.setpointC);
          return (
            <Button
              key={p.id}
              variant="ghost"
              label={`Plan ${p.id} · ${what} °C · ${fmt(p.inputs.batchH, 0)} h · ${fmt(o.predictedProductGPerL, 0)} g/L · ${site.time(p.createdAt)}${p.olderEvidence ? ' · computed on older evidence' : ''}`}
              onPress={() => router.push(`/planner/plan/${p.id}`)}
              testID={`saved-plan-${p.id}`}
            />
          );
        })
      )}
    </Card>
  );
}
