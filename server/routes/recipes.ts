import { Router } from 'express';
import { z } from 'zod';
import { Recipe, RecipeDetail, RecipeInput, RecipeList, RecipePatch } from '../../src/contracts/recipes';
import { allow, currentUser } from '../middleware/auth';
import { changeRecipe, createRecipe, getRecipeDetail, listRecipes } from '../services/recipes';
import type { Services } from './services';

const IdParam = z.object({ id: z.coerce.number().int().positive() });

export function recipesRouter(s: Services): Router {
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
