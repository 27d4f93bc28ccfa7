import { Router } from 'express';
import { IdParam } from './params';
import { Recipe, RecipeDetail, RecipeInput, RecipeList, RecipePatch } from '../../src/contracts/recipes';
import { allow, ALL_ROLES, currentUser } from '../middleware/auth';
import { changeRecipe, createRecipe, getRecipeDetail, listRecipes } from '../services/recipes';
import type { AppContext } from '../context';

export function recipesRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow(...ALL_ROLES), (req, res) => {
    res.json(RecipeList.parse({ recipes: listRecipes(s, currentUser(req)) }));
  });
  router.get('/:id', allow(...ALL_ROLES), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(RecipeDetail.parse(getRecipeDetail(s, currentUser(req), id)));
  });
  router.post('/', allow('engineer', 'admin'), (req, res) => {
    res.status(201).json(Recipe.parse(createRecipe(s, currentUser(req), RecipeInput.parse(req.body))));
  });
  router.patch('/:id', allow('engineer', 'admin'), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Recipe.parse(changeRecipe(s, currentUser(req), id, RecipePatch.parse(req.body))));
  });
  return router;
}
