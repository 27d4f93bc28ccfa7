import { planKey, plansKey } from '../api/keys';
import { Plan, PlanList } from '../contracts/plans';
import { useResource } from './use-resource';

export const usePlans = (recipeId: number | null) => useResource(recipeId ? plansKey(recipeId) : null, PlanList);

export const usePlan = (id: number | null) => useResource(id ? planKey(id) : null, Plan);
