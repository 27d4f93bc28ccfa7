import { keys, recipeKey } from '../api/keys';
import { RecipeDetail, RecipeList } from '../contracts/recipes';
import { useResource } from './use-resource';

export const useRecipes = () => useResource(keys.recipes, RecipeList);

/** A recipe with its vessel, enzyme and the accepted lots it may be planned with. */
export const useRecipe = (id: number | null) => useResource(id ? recipeKey(id) : null, RecipeDetail);
