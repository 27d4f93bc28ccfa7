import { Router } from 'express';
import { IdParam } from './params';
import { Recipe, RecipeDetail, RecipeInput, RecipeList, RecipePatch } from '../../src/contracts/recipes';
import { allow, currentUser } from '../middleware/auth';
import { changeRecipe, createRecipe, getRecipeDetail, listRecipes } from '../services/recipes';
import type { AppContext } from '../context';

export function recipesRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('recipes.read'), (req, res) => {
    res.json(RecipeList.parse({ recipes: listRecipes(s, currentUser(req)) }));
  });
  router.get('/:id', allow('recipes.read'), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(RecipeDetail.parse(getRecipeDetail(s, currentUser(req), id)));
  });
  router.post('/', allow('recipes.edit'), (req, res) => {
    res.status(201).json(Recipe.parse(createRecipe(s, currentUser(req), RecipeInput.parse(req.body))));
  });
  router.patch('/:id', allow('recipes.edit'), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Recipe.parse(changeRecipe(s, currentUser(req), id, RecipePatch.parse(req.body))));
  });
  return router;
}
