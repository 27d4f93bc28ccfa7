import { Slot } from 'expo-router';

// The planner tab holds the recipe list, a recipe's planner and saved plans.
export default function PlannerLayout() {
  return <Slot />;
}
