import { Router } from 'express';
import { SiteSummary } from '../../src/contracts/site';
import { allow, currentUser } from '../middleware/auth';
import { siteSummary } from '../services/site';
import type { Services } from './services';

export function siteRouter(s: Services): Router {
  return Router().get('/', allow('admin', 'supervisor'), (req, res) => {
    res.json(SiteSummary.parse(siteSummary(s, currentUser(req))));
  });
}
