import { api } from '../api/client';
import type { Plan, PlanInputs } from '../contracts/plans';
import { useSubmit } from './use-submit';

/** Saves a plan: the server recomputes every figure from the inputs and answers with the stored plan. */
export const useCreatePlan = () => useSubmit((inputs: PlanInputs) => api<Plan>('/plans', { method: 'POST', body: inputs }), ['/plans']);
