import type { RequestHandler, Router } from 'express';
import { may, type Permission } from '../../shared/permissions.ts';
import { ForbiddenError, UnauthorizedError } from '../errors.ts';

/** Who may call a route: anyone, anyone signed in, or holders of a permission. */
export type Access = 'public' | 'signed-in' | Permission;
export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteSpec {
  method: Method;
  path: string;
  access: Access;
  handler: RequestHandler;
}

/** Refuses by default: a route's access rule is checked before its handler runs. */
export function authorize(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access === 'public') return next();
    if (!req.actor) return next(new UnauthorizedError());
    if (access === 'signed-in' || may(req.actor.role, access)) return next();
    next(new ForbiddenError());
  };
}

/**
 * The route table. Routers add one line a route naming its access rule; `mount` is the only place
 * routes reach Express, so a route without a rule cannot exist (and a test walks the result).
 */
export class RouteTable {
  readonly routes: RouteSpec[] = [];

  add(method: Method, path: string, access: Access, handler: RequestHandler): this {
    if (!access) throw new Error(`${method.toUpperCase()} ${path} has no access rule`);
    this.routes.push({ method, path, access, handler });
    return this;
  }
  get(path: string, access: Access, handler: RequestHandler) {
    return this.add('get', path, access, handler);
  }
  post(path: string, access: Access, handler: RequestHandler) {
    return this.add('post', path, access, handler);
  }
  put(path: string, access: Access, handler: RequestHandler) {
    return this.add('put', path, access, handler);
  }
  patch(path: string, access: Access, handler: RequestHandler) {
    return this.add('patch', path, access, handler);
  }
  delete(path: string, access: Access, handler: RequestHandler) {
    return this.add('delete', path, access, handler);
  }

  mount(router: Router): void {
    for (const r of this.routes) router[r.method](r.path, authorize(r.access), r.handler);
  }
}
