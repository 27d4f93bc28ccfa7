import type { RequestHandler } from 'express';
import { CLIENT_HEADER } from '../../src/contracts/client-header';
import { HttpError } from '../http-error';

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Refuses state-changing requests that a browser sent from another site: SameSite=Strict already keeps the
 * cookie off them, and a custom header cannot be set cross-site without a CORS preflight we never grant.
 */
export const requireSameOrigin: RequestHandler = (req, _res, next) => {
  if (SAFE.has(req.method)) return next();
  const fetchSite = req.get('sec-fetch-site');
  if (fetchSite && fetchSite !== 'same-origin' && fetchSite !== 'none') {
    return next(new HttpError(403, 'cross_site', 'Cross-site requests are refused'));
  }
  if (!req.get(CLIENT_HEADER)) return next(new HttpError(403, 'client_header_missing', `Send the ${CLIENT_HEADER} header`));
  next();
};
