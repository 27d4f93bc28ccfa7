import type { RequestHandler } from 'express';
import { can, rolesWith, type Capability } from '../../src/contracts/permissions';
import type { Role } from '../../src/contracts/roles';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError } from '../http-error';
import { resolveSession, type AuthContext } from '../services/auth';

declare module 'express-serve-static-core' {
  interface Request {
    user?: SessionUser;
    sessionId?: string;
  }
}

export const SESSION_COOKIE = 'yp_session';

/** Attaches the signed-in user, if any; never refuses by itself. */
export function authenticate(ctx: AuthContext): RequestHandler {
  return async (req, _res, next) => {
    const token: unknown = req.cookies?.[SESSION_COOKIE];
    if (typeof token === 'string' && token) {
      const found = await resolveSession(ctx, token);
      if (found) {
        req.user = found.user;
        req.sessionId = found.sessionId;
      }
    }
    next();
  };
}

/** A handler that declares the capability its route needs and the roles holding it; tests read both to check every route. */
export type RoleGuard = RequestHandler & { capability: Capability | 'public'; roles: readonly Role[] | 'public' };

/** Marks a route anyone may call (signing in). */
export const open: RoleGuard = Object.assign(((_req, _res, next) => next()) as RequestHandler, { capability: 'public' as const, roles: 'public' as const });

/** 401 when signed out, 403 when the role lacks the capability (src/contracts/permissions.ts). Every route starts with one. */
export function allow(capability: Capability): RoleGuard {
  const guard: RequestHandler = (req, _res, next) => {
    if (!req.user) return next(new HttpError(401, 'signed_out', 'Sign in to continue'));
    if (!can(req.user.role, capability)) return next(new HttpError(403, 'forbidden', 'Your role cannot do this'));
    next();
  };
  return Object.assign(guard, { capability, roles: rolesWith(capability) });
}

/** The signed-in user of a request that passed `allow`. */
export function currentUser(req: { user?: SessionUser }): SessionUser {
  if (!req.user) throw new HttpError(401, 'signed_out', 'Sign in to continue');
  return req.user;
}
