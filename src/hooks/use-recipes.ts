import { keys, recipeKey } from '../api/keys';
import type { RecipeDetail, RecipeList } from '../contracts/recipes';
import { useResource } from './use-resource';

export const useRecipes = () => useResource<RecipeList>(keys.recipes);

/** A recipe with its vessel, enzyme and the accepted lots it may be planned with. */
export const useRecipe = (id: number | null) => useResource<RecipeDetail>(id ? recipeKey(id) : null);
