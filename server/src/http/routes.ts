import { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
import { can, type Access } from '../auth/permissions.ts';
import type { User } from '../models/user.ts';
import { HttpProblem } from './problem.ts';

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteRecord {
  method: Method;
  /** full path as mounted under /api, Express syntax (e.g. /people/:id) */
  path: string;
  access: Access;
  /** state-changing routes check the CSRF token unless a route opts out with a reason */
  csrf: boolean;
}

/** Requests reaching a handler after the access check carry the signed-in person (for non-public routes). */
export function currentUser(req: Request): User {
  const user = req.user as User | undefined;
  if (!user) throw new HttpProblem(401, 'Not signed in', 'Sign in to use this part of Cartouche.', { type: '/problems/not-signed-in' });
  return user;
}

export function accessCheck(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access.kind === 'public') return next();
    const user = req.user as User | undefined;
    if (!user) return next(new HttpProblem(401, 'Not signed in', 'Sign in to use this part of Cartouche.', { type: '/problems/not-signed-in' }));
    if (access.kind === 'permission' && !can(user.role, access.permission)) {
      return next(
        new HttpProblem(403, 'Forbidden', `The ${user.role} role does not include "${access.permission}".`, { type: '/problems/forbidden' }),
      );
    }
    next();
  };
}

type Handler = (req: Request, res: Response, next: NextFunction) => unknown;

/**
 * A router that cannot hold a route without an access rule: every route is declared with who may call it,
 * recorded in `records` (the permission-matrix test walks them), and guarded before its handlers run.
 */
export class GuardedRouter {
  readonly router = Router();
  readonly records: RouteRecord[] = [];

  constructor(
    private readonly prefix: string,
    private readonly csrfCheck: RequestHandler,
  ) {}

  route(method: Method, path: string, access: Access, ...handlers: Handler[]): this;
  route(method: Method, path: string, access: Access, opts: { csrf: false; because: string }, ...handlers: Handler[]): this;
  route(method: Method, path: string, access: Access, ...rest: Array<Handler | { csrf: false; because: string }>): this {
    const first = rest[0];
    const optOut = typeof first === 'object' && first !== null && 'csrf' in first;
    const handlers = (optOut ? rest.slice(1) : rest) as Handler[];
    const csrf = method !== 'get' && !optOut;
    this.records.push({ method, path: this.prefix + path, access, csrf });
    const chain: RequestHandler[] = [accessCheck(access)];
    if (csrf) chain.unshift(this.csrfCheck);
    this.router[method](path, ...chain, ...handlers.map(wrapAsync));
    return this;
  }
}

/** Express 5 forwards rejected promises itself; this also turns a sync throw into next(err) consistently. */
function wrapAsync(h: Handler): RequestHandler {
  return (req, res, next) => {
    try {
      const r = h(req, res, next);
      if (r instanceof Promise) r.catch(next);
    } catch (err) {
      next(err);
    }
  };
}
