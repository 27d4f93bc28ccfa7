import { Router, type CookieOptions } from 'express';
import rateLimit from 'express-rate-limit';
import { ChangePassword, Session, SessionState, SignInRequest, UpdateMe } from '../../src/contracts/session';
import { allow, currentUser, open, SESSION_COOKIE } from '../middleware/auth';
import { loadSessionUser, signIn, signOut } from '../services/auth';
import { changeOwnPassword } from '../services/passwords';
import { createAccountThrottle, DEVICE_COOKIE, deviceToken, throttleKey } from '../services/sign-in-throttle';
import { acknowledgeCautions } from '../services/users';
import { HttpError } from '../http-error';
import type { AppContext } from '../context';

/** What a person who cannot sign in can do; the sign-in page shows it beside the refusal. */
export const LOCKED_OUT_HELP = 'Forgotten your password? Ask your site admin to send you a reset link by e-mail.';
const tooManyFromAddress = {
  error: { code: 'rate_limited', message: `Too many failed sign-ins from this network; wait a few minutes and try again. ${LOCKED_OUT_HELP}` },
};
const DEVICE_DAYS = 365;

export function sessionRouter(opts: AppContext): Router {
  const router = Router();
  const cookie = (expires: Date): CookieOptions => ({ httpOnly: true, sameSite: 'strict', secure: opts.cookieSecure, path: '/', expires });
  // Only failed sign-ins count against an address (a shift signing in behind one plant address is not refused).
  const perAddress = rateLimit({
    windowMs: opts.signInLimit.windowMs,
    limit: opts.signInLimit.perAddress,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: true,
    requestWasSuccessful: (_req, res) => res.statusCode !== 401,
    message: tooManyFromAddress,
  });
  const accounts = createAccountThrottle(opts.clock, opts.signInLimit);

  // Signing in is the one write open to everyone.
  router.post('/', open, perAddress, async (req, res) => {
    const body = SignInRequest.parse(req.body);
    const key = throttleKey(opts.auth.secret, body.email, req.cookies?.[DEVICE_COOKIE]);
    const waitMs = accounts.begin(key);
    if (waitMs > 0) {
      const seconds = Math.ceil(waitMs / 1000);
      res.set('retry-after', String(seconds));
      throw new HttpError(429, 'rate_limited', `Too many wrong passwords for this account; try again in ${seconds} s. ${LOCKED_OUT_HELP}`);
    }
    const { token, expiresAt, user } = await signIn(opts, body, req.ip ?? 'unknown');
    accounts.succeeded(key);
    res.cookie(SESSION_COOKIE, token, cookie(expiresAt));
    if (!key.startsWith('device:'))
      res.cookie(DEVICE_COOKIE, deviceToken(opts.auth.secret, body.email), cookie(new Date(opts.clock.now().getTime() + DEVICE_DAYS * 86_400_000)));
    res.status(201).json(Session.parse({ user }));
  });

  router.get('/', open, (req, res) => {
    res.json(SessionState.parse({ user: req.user ?? null }));
  });

  router.patch('/', allow('session.own'), async (req, res) => {
    UpdateMe.parse(req.body);
    const user = currentUser(req);
    await acknowledgeCautions(opts, user);
    res.json(Session.parse({ user: await loadSessionUser(opts.db, user.id) }));
  });

  // A stolen session cannot guess the current password faster than sign-in allows.
  router.post('/password', allow('session.own'), async (req, res) => {
    const body = ChangePassword.parse(req.body);
    const user = currentUser(req);
    const key = `password:${user.id}`;
    const waitMs = accounts.begin(key);
    if (waitMs > 0) {
      res.set('retry-after', String(Math.ceil(waitMs / 1000)));
      throw new HttpError(429, 'rate_limited', `Too many wrong passwords; try again in ${Math.ceil(waitMs / 1000)} s`);
    }
    await changeOwnPassword(opts, user, req.sessionId!, body);
    accounts.succeeded(key);
    res.status(204).end();
  });

  router.delete('/', allow('session.own'), async (req, res) => {
    await signOut(opts, req.sessionId!, currentUser(req));
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  return router;
}
