import { Router } from 'express';
import { SitePatch, SiteSummary } from '../../src/contracts/site';
import { allow, currentUser } from '../middleware/auth';
import { changeSite, siteSummary } from '../services/site';
import type { AppContext } from '../context';

export function siteRouter(s: AppContext): Router {
  return Router()
    .get('/', allow('site.read'), (req, res) => {
      res.json(SiteSummary.parse(siteSummary(s, currentUser(req))));
    })
    .patch('/', allow('site.edit'), (req, res) => {
      res.json(SiteSummary.parse(changeSite(s, currentUser(req), SitePatch.parse(req.body))));
    });
}
