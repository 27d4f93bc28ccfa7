import { Router } from 'express';
import { SitePatch, SiteSummary } from '../../src/contracts/site';
import { allow, currentUser } from '../middleware/auth';
import { changeSite, siteSummary } from '../services/site';
import type { AppContext } from '../context';

export function siteRouter(s: AppContext): Router {
  return Router()
    .get('/', allow('site.read'), async (req, res) => {
      res.json(SiteSummary.parse(await siteSummary(s, currentUser(req))));
    })
    .patch('/', allow('site.edit'), async (req, res) => {
      res.json(SiteSummary.parse(await changeSite(s, currentUser(req), SitePatch.parse(req.body))));
    });
}
