import { sharedJson } from '../db/derived-cache';
import { Router, type Request, type RequestHandler, type Response } from 'express';
import type { z, ZodType } from 'zod';
import type { Role } from '../../shared/schemas/vocabulary';
import { forbidden } from './errors';
import { parseOrThrow } from './validate';
import type { CurrentUser } from './auth';
import { callerOf, runForCaller } from './caller';

/**
 * Who may call a route, declared beside every route: a list of roles; `signed_in`, every member of
 * staff (students never reach a staff route: PRODUCT.md §2, §11); or `everyone`, anyone signed in,
 * students included (only routes about the caller themself, such as /api/me).
 */
export type Access = readonly Role[] | 'signed_in' | 'everyone';

export interface RouteDeclaration {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  access: Access;
}

type Infer<S> = S extends ZodType ? z.infer<S> : undefined;

export interface RouteContext<B, Q, P> {
  body: B;
  query: Q;
  params: P;
  user: CurrentUser;
  /** Only for routes that stream files or read uploads; services never see these. */
  req: Request;
  res: Response;
}

export interface RouteDefinition<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined> {
  access: Access;
  body?: B;
  query?: Q;
  params?: P;
  /** Middleware that runs after the role check and before validation (multipart parsing). */
  before?: RequestHandler[];
  /** Status of a successful answer; 200 unless said. */
  status?: number;
  /** Returns the JSON to send, or undefined when it answered through `res` itself. */
  handler: (ctx: RouteContext<Infer<B>, Infer<Q>, Infer<P>>) => unknown | Promise<unknown>;
}

export function allows(access: Access, role: Role): boolean {
  if (access === 'everyone') return true;
  if (access === 'signed_in') return role !== 'student';
  return access.includes(role);
}

/**
 * A router that records every route with its access rule, so one test can enumerate them all.
 * Order in each route: role check → uploads → validation → handler.
 */
export class ApiRouter {
  readonly router = Router();
  readonly routes: RouteDeclaration[] = [];

  constructor(private readonly prefix = '/api') {}

  get<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined>(path: string, def: RouteDefinition<B, Q, P>) {
    this.add('get', path, def);
  }
  post<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined>(path: string, def: RouteDefinition<B, Q, P>) {
    this.add('post', path, def);
  }
  put<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined>(path: string, def: RouteDefinition<B, Q, P>) {
    this.add('put', path, def);
  }
  patch<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined>(path: string, def: RouteDefinition<B, Q, P>) {
    this.add('patch', path, def);
  }
  delete<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined>(path: string, def: RouteDefinition<B, Q, P>) {
    this.add('delete', path, def);
  }

  private add<B extends ZodType | undefined, Q extends ZodType | undefined, P extends ZodType | undefined>(
    method: RouteDeclaration['method'],
    path: string,
    def: RouteDefinition<B, Q, P>,
  ) {
    this.routes.push({ method, path: this.prefix + path, access: def.access });
    const checkRole: RequestHandler = (req, _res, next) => {
      const user = req.user;
      if (!user || !allows(def.access, user.role)) return next(forbidden());
      next();
    };
    const run: RequestHandler = async (req, res) => {
      const ctx = {
        body: def.body ? parseOrThrow(def.body, req.body ?? {}, 'body') : undefined,
        query: def.query ? parseOrThrow(def.query, { ...req.query }, 'query') : undefined,
        params: def.params ? parseOrThrow(def.params, req.params, 'params') : undefined,
        user: req.user!,
        req,
        res,
      } as RouteContext<Infer<B>, Infer<Q>, Infer<P>>;
      // The handler runs as this request's work: heavy work queued for it is dropped if it goes (server/http/caller.ts).
      const result = await runForCaller(callerOf(res), () => def.handler(ctx));
      if (res.headersSent) return;
      if (result === undefined) res.status(def.status ?? 204).end();
      else {
        // An answer from the derived cache is serialised once for every request that gets it.
        const json = sharedJson(result);
        if (json === undefined) res.status(def.status ?? 200).json(result);
        else res.status(def.status ?? 200).set({ 'Content-Type': 'application/json; charset=utf-8', ETag: json.etag }).send(json.body);
      }
    };
    this.router[method](path, checkRole, ...(def.before ?? []), run);
  }
}
