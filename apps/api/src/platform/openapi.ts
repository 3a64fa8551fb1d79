import { createDocument, type ZodOpenApiPathsObject } from 'zod-openapi';

/**
 * The OpenAPI 3.1 document of the routes declared once (platform/route.ts, ADR 0006): zod-openapi makes each
 * operation from the schemas the route parses with.
 */
export function buildOpenApiDocument(version: string, declared: ZodOpenApiPathsObject) {
  return createDocument({
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
}
