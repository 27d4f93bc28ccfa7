import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { RecipeForm } from '@/components/planner/recipe-form';
import { RecipePlanner } from '@/components/planner/recipe-planner';
import { Button, ErrorState, Loader, Screen } from '@/components/ui';
import { can } from '@/contracts/permissions';
import type { Recipe } from '@/contracts/recipes';
import { useIdParam } from '@/hooks/use-id-param';
import { useRecipe } from '@/hooks/use-recipes';
import { useSession } from '@/hooks/use-session';
import { space } from '@/theme';

/** Engineers and admins change the saved recipe here; the planner above redraws from the saved values. */
function RecipeChange({ recipe }: { recipe: Recipe }) {
  const { session } = useSession();
  const [isOpen, setOpen] = useState(false);
  if (!session || !can(session.user.role, 'recipes.edit')) return null;
  if (isOpen) return <RecipeForm recipe={recipe} onDone={() => setOpen(false)} />;
  return (
    <View style={styles.change}>
      <Button label="Change the recipe" variant="secondary" onPress={() => setOpen(true)} testID="recipe-edit" />
    </View>
  );
}

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
        <>
          <RecipeChange recipe={data.recipe} />
          {/* A saved change starts the planner again from the recipe's new values. */}
          <RecipePlanner key={`${data.recipe.id}-${data.recipe.updatedAt}`} detail={data} />
        </>
      )}
    </Screen>
  );
}

export default function RecipePlannerScreen() {
  const id = useIdParam('recipeId');
  return <Body id={id} />;
}

const styles = StyleSheet.create({
  change: { alignSelf: 'flex-start', marginBottom: space.sm },
});
