import { planKey, plansKey } from '../api/keys';
import type { Plan, PlanList } from '../contracts/plans';
import { useResource } from './use-resource';

export const usePlans = (recipeId: number | null) => useResource<PlanList>(recipeId ? plansKey(recipeId) : null);

export const usePlan = (id: number | null) => useResource<Plan>(id ? planKey(id) : null);
