import { Slot } from 'expo-router';
import { RoleGate } from '@/components/shell/role-gate';

// The planner tab holds the recipe list, a recipe's planner and saved plans.
// Only the roles whose permission table row `place.planner` holds see them; the others get a plain refusal.
export default function PlannerLayout() {
  return (
    <RoleGate name="planner">
      <Slot />
    </RoleGate>
  );
}
