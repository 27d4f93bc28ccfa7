import { router } from 'expo-router';
import { useState } from 'react';
import { Button, Card, Choice, EmptyState, ErrorState, Loader, Screen, Text } from '@/components/ui';
import { Field } from '@/components/ui/field';
import { can } from '@/contracts/permissions';
import { fmt } from '@/format';
import { useSession } from '@/hooks/use-session';
import { useRecipe, useRecipes } from '@/hooks/use-recipes';
import { useStartBatch } from '@/hooks/use-start-batch';
import { useVessels } from '@/hooks/use-vessels';
import { useSiteFormat } from '@/hooks/use-site-format';

// Nothing chosen yet: no option has this value.
const NONE = -1;

function FieldError({ message, testID }: { message?: string; testID: string }) {
  return message ? (
    <Text variant="small" tone="danger" testID={testID}>
      {message}
    </Text>
  ) : null;
}

function StartForm() {
  const { session } = useSession();
  const site = useSiteFormat();
  const [recipeId, setRecipeId] = useState<number | null>(null);
  const [vesselId, setVesselId] = useState<number | null>(null);
  const [lotId, setLotId] = useState<number | null>(null);
  const [time, setTime] = useState(() => site.inputValue(new Date()));
  const [timeError, setTimeError] = useState<string | undefined>();
  const recipes = useRecipes();
  const detail = useRecipe(recipeId);
  const vessels = useVessels();
  const start = useStartBatch();

  // A recipe brings its own vessel and lot as the first choice (set while rendering: no frame shows the old ones).
  const [recipeShown, setRecipeShown] = useState<typeof detail.data>(undefined);
  if (detail.data !== recipeShown) {
    setRecipeShown(detail.data);
    if (detail.data) {
      setVesselId(detail.data.recipe.vesselId);
      setLotId(detail.data.recipe.lotId);
    }
  }

  if (session && !can(session.user.role, 'batches.start'))
    return <EmptyState title="Not part of your role" message="Supervisors and engineers start batches." />;
  const failed = recipes.error ?? vessels.error;
  if (failed) return <ErrorState error={failed} onRetry={() => (recipes.retry(), vessels.retry())} />;
  if (!recipes.data || !vessels.data) return <Loader rows={4} label="Loading recipes and vessels" />;
  if (!recipes.data.recipes.length) return <EmptyState title="No recipes yet" message="An engineer sets up a recipe in the planner first." />;
  const r = detail.data?.recipe;
  const source = r
    ? r.releasedPlanId
      ? `Runs the released plan #${r.releasedPlanId} (released ${r.releasedAt?.slice(0, 10)}).`
      : `No plan has been released for this recipe: the batch runs its current setpoint of ${fmt(r.currentSetpointC)} °C for ${fmt(r.batchH, 0)} h.`
    : null;
  async function onStart() {
    const at = site.parseInput(time);
    if (!at) return setTimeError('Write the time as YYYY-MM-DD HH:mm');
    setTimeError(undefined);
    if (!recipeId || !vesselId || !lotId) return;
    const b = await start.submit({ recipeId, vesselId, lotId, startedAt: at.toISOString() });
    if (b) router.replace(`/batches/${b.id}`);
  }
  const f = start.error?.fields ?? {};
  return (
    <Card testID="start-form">
      <Choice
        label="Recipe"
        testID="start-recipe"
        value={recipeId ?? NONE}
        onChange={setRecipeId}
        options={recipes.data.recipes.map((x) => ({ value: x.id, label: x.name }))}
      />
      <FieldError message={f.recipeId} testID="start-recipe-error" />
      {source ? (
        <Text variant="small" testID="start-source">
          {source}
        </Text>
      ) : null}
      {detail.error ? <ErrorState error={detail.error} onRetry={detail.retry} /> : null}
      {detail.data ? (
        <>
          <Choice
            label="Vessel"
            testID="start-vessel"
            value={vesselId ?? NONE}
            onChange={setVesselId}
            options={vessels.data.vessels.map((v) => ({ value: v.id, label: `${v.name} (${v.minC}–${v.maxC} °C)` }))}
          />
          <FieldError message={f.vesselId} testID="start-vessel-error" />
          <Choice
            label="Lot (accepted only)"
            testID="start-lot"
            value={lotId ?? NONE}
            onChange={setLotId}
            options={detail.data.lots.map((l) => ({ value: l.id, label: `${l.lotCode} (expires ${l.expiresOn})` }))}
          />
          <FieldError message={f.lotId} testID="start-lot-error" />
        </>
      ) : null}
      <Field label={`Start time, site clock (${site.zone()})`} value={time} onChangeText={setTime} testID="start-time" error={timeError ?? f.startedAt} />
      {start.error && !Object.keys(f).length ? (
        <Text variant="small" tone="danger">
          {start.error.message}
        </Text>
      ) : null}
      <Button label="Start batch" onPress={() => void onStart()} isBusy={start.isBusy} disabled={!recipeId || !vesselId || !lotId} testID="start-submit" />
    </Card>
  );
}

export default function StartBatchScreen() {
  return (
    <Screen
      title="Start a batch"
      subtitle="Recipe, vessel, an accepted lot and the start time."
      testID="screen-batch-start"
      actions={<Button label="All batches" variant="ghost" onPress={() => router.navigate('/batches')} />}
    >
      <StartForm />
    </Screen>
  );
}
