import { useState } from 'react';
import { useSWRConfig } from 'swr';
import { api, ApiError } from '../api/client';
import { plansKey } from '../api/keys';
import type { Plan, PlanInputs } from '../contracts/plans';

/** Saves a plan: the server recomputes every figure from the inputs and answers with the stored plan. */
export function useCreatePlan() {
  const { mutate } = useSWRConfig();
  const [error, setError] = useState<ApiError | null>(null);
  const [isBusy, setBusy] = useState(false);
  async function create(inputs: PlanInputs): Promise<Plan | null> {
    setBusy(true);
    setError(null);
    try {
      const plan = await api<Plan>('/plans', { method: 'POST', body: inputs });
      await mutate(plansKey(inputs.recipeId));
      return plan;
    } catch (e) {
      setError(e instanceof ApiError ? e : new ApiError(0, 'unknown', String(e)));
      return null;
    } finally {
      setBusy(false);
    }
  }
  return { create, error, isBusy };
}
