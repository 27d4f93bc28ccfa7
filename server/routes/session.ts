import { Router, type CookieOptions } from 'express';
import rateLimit from 'express-rate-limit';
import { Session, SessionState, SignInRequest, UpdateMe } from '../../src/contracts/session';
import { allow, ALL_ROLES, currentUser, open, SESSION_COOKIE } from '../middleware/auth';
import { loadSessionUser, signIn, signOut, type AuthContext } from '../services/auth';
import { acknowledgeCautions } from '../services/users';

export type SessionRouteOptions = AuthContext & { cookieSecure: boolean; signInLimit: { perAddress: number; perAccount: number; windowMs: number } };

const tooMany = { error: { code: 'rate_limited', message: 'Too many sign-in attempts; wait a few minutes and try again' } };

export function sessionRouter(opts: SessionRouteOptions): Router {
  const router = Router();
  const cookie = (expires: Date): CookieOptions => ({ httpOnly: true, sameSite: 'strict', secure: opts.cookieSecure, path: '/', expires });
  const limitCommon = { windowMs: opts.signInLimit.windowMs, standardHeaders: 'draft-8' as const, legacyHeaders: false, message: tooMany };
  const perAddress = rateLimit({ ...limitCommon, limit: opts.signInLimit.perAddress });
  const perAccount = rateLimit({
    ...limitCommon,
    limit: opts.signInLimit.perAccount,
    keyGenerator: (req) => `account:${String(req.body?.email ?? '').trim().toLowerCase()}`,
  });

  // Signing in is the one write open to everyone.
  router.post('/', open, perAddress, perAccount, async (req, res) => {
    const body = SignInRequest.parse(req.body);
    const { token, expiresAt, user } = await signIn(opts, body, req.ip ?? 'unknown');
    res.cookie(SESSION_COOKIE, token, cookie(expiresAt));
    res.status(201).json(Session.parse({ user }));
  });

  router.get('/', open, (req, res) => {
    res.json(SessionState.parse({ user: req.user ?? null }));
  });

  router.patch('/', allow(...ALL_ROLES), (req, res) => {
    UpdateMe.parse(req.body);
    const user = currentUser(req);
    acknowledgeCautions(opts, user);
    res.json(Session.parse({ user: loadSessionUser(opts.db, user.id) }));
  });

  router.delete('/', allow(...ALL_ROLES), (req, res) => {
    signOut(opts, req.sessionId!, currentUser(req));
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  return router;
}
