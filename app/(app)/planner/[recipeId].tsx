import { useLocalSearchParams } from 'expo-router';
import { RecipePlanner } from '@/components/planner/recipe-planner';
import { RoleGate } from '@/components/shell/role-gate';
import { ErrorState, Loader, Screen } from '@/components/ui';
import { useRecipe } from '@/hooks/use-recipes';

function Body({ id }: { id: number | null }) {
  const { data, error, isLoading, retry } = useRecipe(id);
  const subtitle = data ? `${data.vessel.name} · ${data.enzyme.name}. Computed in your browser as you change the inputs.` : undefined;
  return (
    <Screen title={data?.recipe.name ?? 'Recipe planner'} subtitle={subtitle} testID="screen-recipe-planner">
      {id === null ? (
        <ErrorState error={new Error('No such recipe')} />
      ) : error ? (
        <ErrorState error={error} onRetry={retry} />
      ) : isLoading || !data ? (
        <Loader rows={4} label="Loading the recipe" />
      ) : (
        <RecipePlanner key={data.recipe.id} detail={data} />
      )}
    </Screen>
  );
}

export default function RecipePlannerScreen() {
  const { recipeId } = useLocalSearchParams<{ recipeId: string }>();
  const id = Number(recipeId);
  return (
    <RoleGate name="planner">
      <Body id={Number.isInteger(id) && id > 0 ? id : null} />
    </RoleGate>
  );
}
