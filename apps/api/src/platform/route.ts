import { Router, type Request, type RequestHandler, type Response } from 'express';
import { z } from 'zod';
import type { ZodOpenApiOperationObject, ZodOpenApiPathsObject } from 'zod-openapi';
import { apiErrorSchema, type Endpoint } from '@tierscope/contracts';
import { can, ROLES, type Permission } from '@tierscope/domain';
import { parseInput } from './errors';

/**
 * A route declared once (docs/adr/0006): its endpoint (method, path, who may call it, its path parameters,
 * query, body and answer as zod schemas — from `endpoints` in @tierscope/contracts for `/api/v1`, which the
 * web app's client calls too) and its handler. From the one declaration come the Express registration, the parsing
 * of every input (a bad one is a 400 naming its field, before the handler runs) and the route's OpenAPI
 * operation (zod-openapi). Farm and role checks stay in the services, which know the resource's farm.
 */
export interface RouteDeclaration extends Endpoint {
  /** middleware that runs before the inputs are parsed (uploads) */
  before?: RequestHandler[];
  /** undoes what `before` left when the request is refused (an upload's file on disk) */
  release?: (req: Request) => void;
  handle(input: { params: never; query: never; body: never; req: Request; res: Response }): unknown;
}

type Input<S> = S extends z.ZodType ? z.output<S> : undefined;

/**
 * Declares a route; the handler's `params`, `query` and `body` are typed by the schemas given. What the
 * handler returns is sent as JSON with the declared status — unless it answered itself through `res`.
 */
export function route<
  P extends z.ZodObject | undefined = undefined,
  Q extends z.ZodType | undefined = undefined,
  B extends z.ZodType | undefined = undefined,
>(
  declaration: Omit<RouteDeclaration, 'params' | 'query' | 'body' | 'handle'> & {
    params?: P;
    query?: Q;
    body?: B;
    handle(input: {
      params: Input<P>;
      query: Input<Q>;
      body: Input<B>;
      req: Request;
      res: Response;
    }): unknown;
  },
): RouteDeclaration {
  return declaration;
}

/** A feature's routes: mounted on one router, and kept for the OpenAPI document. */
export interface DeclaredRoutes {
  router: Router;
  routes: readonly RouteDeclaration[];
  /** the heading the document lists them under */
  tag: string;
}

export function declareRoutes(tag: string, routes: readonly RouteDeclaration[]): DeclaredRoutes {
  const router = Router();
  for (const declaration of routes) {
    const run = (req: Request, res: Response) => {
      const input = {
        params: declaration.params ? parseInput(declaration.params, req.params, 'path') : undefined,
        query: declaration.query ? parseInput(declaration.query, req.query, 'query') : undefined,
        body: declaration.body ? parseInput(declaration.body, req.body) : undefined,
        req,
        res,
      };
      return declaration.handle(input as never);
    };
    const handler: RequestHandler = async (req, res) => {
      let answer: unknown;
      try {
        answer = await run(req, res);
      } catch (error) {
        if (!res.headersSent) declaration.release?.(req);
        throw error;
      }
      if (res.headersSent) return;
      const status = declaration.status ?? 200;
      if (status === 204) res.status(204).end();
      else res.status(status).json(answer);
    };
    router[declaration.method](declaration.path, ...(declaration.before ?? []), handler);
  }
  return { router, routes, tag };
}

const STANDARD_ERRORS: Record<number, string> = {
  400: 'Invalid input, with field-level errors',
  401: 'Missing, invalid or expired token',
  403: 'Your role on this farm does not allow it',
  404: 'Not found, or not on a farm of yours',
};

/** Who may call a route, in the document's words: the roles holding its permission, or any signed-in user. */
function whoMayCall(
  permission: Permission | undefined,
  access: 'public' | 'user' | 'gateway',
): Pick<ZodOpenApiOperationObject, 'description'> & { 'x-permission'?: Permission } {
  if (permission) {
    const roles = ROLES.filter((role) => can(role, permission)).join(', ');
    return {
      description: `Who may call it: ${roles} of the farm (permission \`${permission}\`).`,
      'x-permission': permission,
    };
  }
  return access === 'user'
    ? { description: 'Any signed-in user; answers cover only their own farms.' }
    : {};
}

/** The OpenAPI operations of declared routes mounted at `prefix` (e.g. `/api/v1`). */
export function routeOperations(prefix: string, feature: DeclaredRoutes): ZodOpenApiPathsObject {
  const paths: ZodOpenApiPathsObject = {};
  const json = (schema: z.ZodType) => ({ content: { 'application/json': { schema } } });
  for (const r of feature.routes) {
    const access = r.access ?? 'user';
    const errors = {
      ...(access === 'public' ? { 400: STANDARD_ERRORS[400] ?? '' } : STANDARD_ERRORS),
      ...r.errors,
    };
    const operation: ZodOpenApiOperationObject = {
      tags: [feature.tag],
      summary: r.summary,
      ...whoMayCall(r.permission, access),
      ...(r.params || r.query
        ? {
            requestParams: {
              ...(r.params ? { path: r.params } : {}),
              ...(r.query instanceof z.ZodObject ? { query: r.query } : {}),
            },
          }
        : {}),
      ...(access === 'public'
        ? {}
        : { security: [access === 'gateway' ? { gatewayKey: [] } : { bearer: [] }] }),
      ...(r.body ? { requestBody: { required: true, ...json(r.body) } } : {}),
      ...(r.upload
        ? {
            requestBody: {
              required: true,
              content: { 'multipart/form-data': { schema: r.upload } },
            },
          }
        : {}),
      responses: {
        [r.status ?? 200]: {
          description: r.status === 201 ? 'Created' : r.status === 204 ? 'Done' : 'OK',
          ...(typeof r.answer === 'string'
            ? {
                content: {
                  [r.answer]: { schema: r.answer === 'text/csv' ? z.string() : z.file() },
                },
              }
            : r.answer
              ? json(r.answer)
              : {}),
        },
        ...Object.fromEntries(
          Object.entries(errors).map(([status, description]) => [
            status,
            { description, ...json(apiErrorSchema) },
          ]),
        ),
      },
    };
    const path = `${prefix}${r.path}`.replace(/:(\w+)/g, '{$1}');
    paths[path] = { ...paths[path], [r.method]: operation };
  }
  return paths;
}
