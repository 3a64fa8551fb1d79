import {
  apiErrorSchema,
  ingestResultSchema,
  readingsBatchSchema,
  readingInputSchema,
  loginRequestSchema,
  loginResponseSchema,
  sessionSchema,
  forgotPasswordSchema,
  setPasswordSchema,
} from '@tierscope/contracts';
import { z } from 'zod';
import { createDocument, type ZodOpenApiPathsObject } from 'zod-openapi';

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';
interface RouteDoc {
  method: Method;
  path: string;
  summary: string;
  body?: z.ZodType;
  responses: Record<number, { description: string; schema?: z.ZodType }>;
}

/**
 * The OpenAPI 3.1 document: the operations of the routes declared once (platform/route.ts, made by
 * zod-openapi from the schemas the routes parse with), and — until every feature declares its routes that
 * way — the list below for the others (zod's own JSON Schema output).
 */
export function buildOpenApiDocument(version: string, declared: ZodOpenApiPathsObject = {}) {
  const document = createDocument({
    openapi: '3.1.0',
    info: {
      title: 'Tierscope API',
      version,
      description: 'Egg-production monitor for multi-tier houses',
    },
    components: {
      securitySchemes: {
        bearer: { type: 'http', scheme: 'bearer', bearerFormat: 'JWT' },
        gatewayKey: { type: 'http', scheme: 'bearer', description: 'A gateway key (tsg_…)' },
      },
    },
    paths: declared,
  });
  const paths: Record<string, object> = listedPaths();
  for (const [path, operations] of Object.entries(document.paths ?? {}))
    paths[path] = { ...paths[path], ...operations };
  return { ...document, paths };
}

/** The routes not declared with platform/route.ts yet. */
function listedPaths(): Record<string, Record<string, unknown>> {
  const ok = (schema: z.ZodType, description = 'OK') => ({ description, schema });
  const error = (description: string) => ({ description, schema: apiErrorSchema });
  const errors = {
    400: error('Invalid input, with field-level errors'),
    401: error('Missing, invalid or expired token'),
    403: error('Your role on this farm does not allow it'),
    404: error('Not found, or not on a farm of yours'),
  };
  const routes: RouteDoc[] = [
    {
      method: 'get',
      path: '/api/v1/openapi.json',
      summary: 'This document (OpenAPI 3.1)',
      responses: { 200: { description: 'The OpenAPI document' } },
    },
    {
      method: 'post',
      path: '/api/v1/auth/login',
      summary: 'Sign in',
      body: loginRequestSchema,
      responses: {
        200: ok(loginResponseSchema),
        400: errors[400],
        401: error('Wrong e-mail or password'),
        403: error('Account disabled'),
        429: error('Too many failed sign-ins'),
      },
    },
    {
      method: 'get',
      path: '/api/v1/auth/me',
      summary: 'The signed-in user and their farm roles',
      responses: { 200: ok(sessionSchema), 401: errors[401] },
    },
    {
      method: 'post',
      path: '/api/v1/ingest/readings',
      summary:
        'Post up to 10,000 counter readings with a gateway key. Each reading carries eggs (since the previous reading) or total (running total). Re-sending never counts twice.',
      body: readingsBatchSchema.extend({ readings: z.array(readingInputSchema).max(10_000) }),
      responses: {
        200: ok(ingestResultSchema),
        400: errors[400],
        401: error('Missing, unknown or revoked gateway key'),
        413: error('More than 10,000 readings, or a body over 4 MB'),
        503: error('Database unreachable: retry'),
      },
    },
    {
      method: 'post',
      path: '/api/v1/auth/forgot',
      summary:
        'Mail a password-reset link; the same answer whether or not the address has an account',
      body: forgotPasswordSchema,
      responses: { 202: { description: 'Accepted' }, 400: errors[400] },
    },
    {
      method: 'post',
      path: '/api/v1/auth/set-password',
      summary: 'Choose a password with a mailed link (invitation or reset); single use, expiring',
      body: setPasswordSchema,
      responses: { 200: ok(loginResponseSchema), 400: errors[400] },
    },
  ];
  const jsonSchema = (schema: z.ZodType, io: 'input' | 'output') =>
    z.toJSONSchema(schema, { io, unrepresentable: 'any', target: 'draft-2020-12' });
  const paths: Record<string, Record<string, unknown>> = {};
  for (const route of routes) {
    const isPublic =
      route.path.startsWith('/api/health') ||
      route.path === '/api/v1/openapi.json' ||
      ['login', 'forgot', 'set-password'].some((p) => route.path === `/api/v1/auth/${p}`);
    const isGateway = route.path === '/api/v1/ingest/readings';
    const parameters = [...route.path.matchAll(/\{(\w+)\}/g)].map((m) => ({
      name: m[1],
      in: 'path',
      required: true,
      schema: { type: 'integer', minimum: 1 },
    }));
    const operations = (paths[route.path] ??= {});
    operations[route.method] = {
      summary: route.summary,
      ...(parameters.length ? { parameters } : {}),
      ...(isPublic ? {} : { security: [isGateway ? { gatewayKey: [] } : { bearer: [] }] }),
      ...(route.body
        ? {
            requestBody: {
              required: true,
              content: { 'application/json': { schema: jsonSchema(route.body, 'input') } },
            },
          }
        : {}),
      responses: Object.fromEntries(
        Object.entries(route.responses).map(([status, r]) => [
          status,
          {
            description: r.description,
            ...(r.schema
              ? { content: { 'application/json': { schema: jsonSchema(r.schema, 'output') } } }
              : {}),
          },
        ]),
      ),
    };
  }
  return paths;
}
