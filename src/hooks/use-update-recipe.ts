import { api } from '../api/client';
import { keys, recipeKey } from '../api/keys';
import type { Recipe, RecipePatch } from '../contracts/recipes';
import { useSubmit } from './use-submit';

/** Changes a recipe's charge, lot, vessel or prices; the setpoint moves only through change control. */
export const useUpdateRecipe = () => useSubmit((id: number, body: RecipePatch) => api<Recipe>(recipeKey(id), { method: 'PATCH', body }), [keys.recipes]);
