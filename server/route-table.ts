import type { Router } from 'express';
import type { Capability } from '../src/contracts/permissions';
import type { Role } from '../src/contracts/roles';
import type { RoleGuard } from './middleware/auth';

export type ApiMount = { prefix: string; router: Router };
export type ApiRoute = { method: string; path: string; capability: Capability | 'public' | null; roles: readonly Role[] | 'public' | null };

type Layer = { route?: { path: string; methods: Record<string, boolean>; stack: { handle: Partial<RoleGuard> }[] } };

/**
 * Every API route with the capability and roles its guard declares (null: no guard, which the route-matrix test forbids).
 * Read from the routers themselves, so a new route is covered without editing a list.
 */
export function listApiRoutes(mounts: readonly ApiMount[]): ApiRoute[] {
  const routes: ApiRoute[] = [];
  for (const { prefix, router } of mounts) {
    for (const layer of router.stack as unknown as Layer[]) {
      if (!layer.route) continue;
      const guard = layer.route.stack.find((s) => s.handle.capability !== undefined)?.handle;
      for (const method of Object.keys(layer.route.methods)) {
        routes.push({
          method: method.toUpperCase(),
          path: `/api${prefix}${layer.route.path === '/' ? '' : layer.route.path}`,
          capability: guard?.capability ?? null,
          roles: guard?.roles ?? null,
        });
      }
    }
  }
  return routes;
}
