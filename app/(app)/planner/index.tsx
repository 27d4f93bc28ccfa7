import { RecipeList } from '@/components/planner/recipe-list';
import { Screen } from '@/components/ui';

export default function PlannerScreen() {
  return (
    <Screen title="Planner" subtitle="The setpoint that makes the most product over the whole batch. Choose a recipe." testID="screen-planner">
      <RecipeList />
    </Screen>
  );
}
