import { RecipeList } from '@/components/planner/recipe-list';
import { RoleGate } from '@/components/shell/role-gate';
import { Screen } from '@/components/ui';

export default function PlannerScreen() {
  return (
    <RoleGate name="planner">
      <Screen title="Planner" subtitle="The setpoint that makes the most product over the whole batch. Choose a recipe." testID="screen-planner">
        <RecipeList />
      </Screen>
    </RoleGate>
  );
}
