import { Router } from 'express';
import { IdParam } from './params';
import { Recipe, RecipeDetail, RecipeInput, RecipeList, RecipePatch } from '../../src/contracts/recipes';
import { allow, currentUser } from '../middleware/auth';
import { changeRecipe, createRecipe, getRecipeDetail, listRecipes } from '../services/recipes';
import type { AppContext } from '../context';

export function recipesRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('recipes.read'), async (req, res) => {
    res.json(RecipeList.parse({ recipes: await listRecipes(s, currentUser(req)) }));
  });
  router.get('/:id', allow('recipes.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(RecipeDetail.parse(await getRecipeDetail(s, currentUser(req), id)));
  });
  router.post('/', allow('recipes.edit'), async (req, res) => {
    res.status(201).json(Recipe.parse(await createRecipe(s, currentUser(req), RecipeInput.parse(req.body))));
  });
  router.patch('/:id', allow('recipes.edit'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Recipe.parse(await changeRecipe(s, currentUser(req), id, RecipePatch.parse(req.body))));
  });
  return router;
}
