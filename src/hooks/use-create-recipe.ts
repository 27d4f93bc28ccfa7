import { api } from '../api/client';
import { keys } from '../api/keys';
import type { Recipe, RecipeInput } from '../contracts/recipes';
import { useSubmit } from './use-submit';

/** Adds a recipe; the server checks the lot is accepted and every number against its rule. */
export const useCreateRecipe = () => useSubmit((body: RecipeInput) => api<Recipe>('/recipes', { method: 'POST', body }), [keys.recipes]);
