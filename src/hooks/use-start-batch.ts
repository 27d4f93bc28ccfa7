import { api } from '../api/client';
import { keys, recipeKey } from '../api/keys';
import { Batch, type BatchStart } from '../contracts/batches';
import { RecipeDetail, RecipeList } from '../contracts/recipes';
import { VesselList } from '../contracts/vessels';
import { useResource } from './use-resource';
import { useSubmit } from './use-submit';

/** What the start form chooses from: recipes, the chosen recipe's accepted lots, and the site's vessels. */
export function useStartOptions(recipeId: number | null) {
  const recipes = useResource(keys.recipes, RecipeList);
  const detail = useResource(recipeId ? recipeKey(recipeId) : null, RecipeDetail);
  const vessels = useResource(keys.vessels, VesselList);
  return { recipes, detail, vessels };
}

export const useStartBatch = () => useSubmit((input: BatchStart) => api('/batches', Batch, { method: 'POST', body: input }), [keys.batches]);
