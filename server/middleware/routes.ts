import { Router, type Request, type RequestHandler, type Response } from 'express';
import type { z } from 'zod';
import type { Role } from '@shared/protocol/roles';
import type { SignedInUser } from '../features/people/people.service';
import { forbidden, unauthenticated } from './http-error';
import { parseInput } from './validate';

/** Who may call a route. There is no default: every route says it. */
export type Access = { public: true } | { roles: readonly Role[] | 'any' };

export interface HandlerContext<B, Q, P> {
  req: Request;
  res: Response;
  body: B;
  query: Q;
  params: P;
  /** Set for every route that is not public. */
  user: SignedInUser;
}

export interface RouteSpec {
  method: 'get' | 'post' | 'put' | 'delete';
  /** Path under /api. */
  path: string;
  access: Access;
  status?: number;
  /** Middleware that runs before the handler (e.g. throttles). */
  before?: RequestHandler[];
  /** The input schemas, parsed in this order before the handler runs (the attack tests fuzz each one). */
  schemas: { params?: z.ZodType; query?: z.ZodType; body?: z.ZodType };
  handle(req: Request, res: Response): Promise<void>;
}

/**
 * Declares an API route: its access rule, its input schemas and its handler.
 * The handler's return value is sent as JSON; `undefined` means the handler answered itself.
 */
export function route<
  B extends z.ZodType = z.ZodUnknown,
  Q extends z.ZodType = z.ZodUnknown,
  P extends z.ZodType = z.ZodUnknown,
>(spec: {
  method: RouteSpec['method'];
  path: string;
  access: Access;
  status?: number;
  before?: RequestHandler[];
  body?: B;
  query?: Q;
  params?: P;
  handler(ctx: HandlerContext<z.infer<B>, z.infer<Q>, z.infer<P>>): Promise<unknown>;
}): RouteSpec {
  return {
    method: spec.method,
    path: spec.path,
    access: spec.access,
    status: spec.status,
    before: spec.before,
    schemas: { params: spec.params, query: spec.query, body: spec.body },
    async handle(req, res) {
      const user = req.user as SignedInUser | undefined;
      if (!('public' in spec.access)) {
        if (!user) throw unauthenticated();
        const allowed = spec.access.roles;
        if (allowed !== 'any' && !user.roles.some((r) => allowed.includes(r))) throw forbidden();
      }
      const params = spec.params ? parseInput(spec.params, req.params, 'address') : req.params;
      const query = spec.query ? parseInput(spec.query, req.query, 'query') : req.query;
      const body = spec.body ? parseInput(spec.body, req.body ?? {}, 'request') : undefined;
      // Without a schema the handler gets the raw value; with one, the parsed value (typed by the schema).
      const ctx = { req, res, body, query, params, user: user as SignedInUser } as HandlerContext<z.infer<B>, z.infer<Q>, z.infer<P>>;
      const result = await spec.handler(ctx);
      if (result === undefined) return;
      res.status(spec.status ?? 200).json(result);
    },
  };
}

export function mountRoutes(specs: RouteSpec[]): Router {
  const router = Router();
  for (const spec of specs) {
    router[spec.method](spec.path, ...(spec.before ?? []), (req, res) => spec.handle(req, res));
  }
  return router;
}
