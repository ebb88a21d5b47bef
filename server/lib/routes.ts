import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type { Role } from '../../shared/schemas/auth';
import { requireAuth, requireRoles } from '../middleware/auth';
import type { Deps } from '../deps';

/** Who may call a route: anyone, any signed-in user, or the roles listed. */
export type Access = 'public' | 'user' | readonly Role[];

export type RouteSpec = { method: 'get' | 'post' | 'put' | 'patch' | 'delete'; path: string; access: Access };

/**
 * Registers routes and keeps the table of every route with its access rule, so that the
 * security suite can walk all of them and a new route cannot escape it.
 */
export class RouteTable {
  readonly routes: RouteSpec[] = [];
  constructor(
    private readonly router: Router,
    private readonly deps: Deps,
    private readonly prefix = '',
  ) {}

  add(spec: RouteSpec, ...handlers: Array<(req: Request, res: Response, next: NextFunction) => unknown>) {
    this.routes.push({ ...spec, path: this.prefix + spec.path });
    const guards: RequestHandler[] = [];
    if (spec.access !== 'public') guards.push(requireAuth(this.deps));
    if (Array.isArray(spec.access)) guards.push(requireRoles(spec.access as readonly Role[]));
    this.router[spec.method](spec.path, ...guards, ...(handlers as RequestHandler[]));
  }
}
