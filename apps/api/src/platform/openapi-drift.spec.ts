import { endpoints, type Endpoint } from '@tierscope/contracts';
import { createTestDatabase } from '@tierscope/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp } from '../testing/test-app';
import type { Express } from 'express';
import request from 'supertest';

/**
 * The OpenAPI document and the Express router list the same routes, both ways: a route mounted but not
 * documented (integrators cannot find it, the robustness corpus never walks it) or documented but not
 * mounted fails here, naming it.
 */
interface RouterLayer {
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle?: { stack?: RouterLayer[] };
  rawPath?: string | string[];
  slash?: boolean;
}

function mountedRoutes(stack: readonly RouterLayer[], prefix = ''): string[] {
  const found: string[] = [];
  for (const layer of stack) {
    if (layer.route) {
      const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
      for (const method of Object.keys(layer.route.methods).filter((m) => m !== '_all'))
        for (const path of paths) found.push(`${method.toUpperCase()} ${prefix}${path}`);
    } else if (layer.handle?.stack) {
      const mount = layer.slash || typeof layer.rawPath !== 'string' ? '' : layer.rawPath;
      found.push(...mountedRoutes(layer.handle.stack, prefix + mount));
    }
  }
  return found;
}

let database: Awaited<ReturnType<typeof createTestDatabase>>;
beforeAll(async () => {
  database = await createTestDatabase();
});
afterAll(async () => {
  await database.drop();
});

describe('the OpenAPI document against the mounted routes', () => {
  it('lists every mounted route and nothing else', async () => {
    const app = createTestApp(database.db) as unknown as { router: { stack: RouterLayer[] } };
    const mounted = new Set(
      mountedRoutes(app.router.stack).map((r) => r.replace(/:(\w+)/g, '{$1}')),
    );
    const document = (await request(app as unknown as Express).get('/api/v1/openapi.json'))
      .body as { paths: Record<string, object> };
    const documented = new Set(
      Object.entries(document.paths).flatMap(([path, methods]) =>
        Object.keys(methods).map((method) => `${method.toUpperCase()} ${path}`),
      ),
    );
    expect(
      [...mounted].filter((r) => !documented.has(r)).sort(),
      'mounted, not documented',
    ).toEqual([]);
    expect(
      [...documented].filter((r) => !mounted.has(r)).sort(),
      'documented, not mounted',
    ).toEqual([]);
  });
});

describe('the shared endpoint declarations', () => {
  it('are what /api/v1 mounts: every mounted route there is an endpoint the web client can call, and back', () => {
    const app = createTestApp(database.db) as unknown as { router: { stack: RouterLayer[] } };
    const mounted = new Set(
      mountedRoutes(app.router.stack).filter(
        (r) => r.includes(' /api/v1/') && r !== 'GET /api/v1/openapi.json',
      ),
    );
    const declared = new Set(
      Object.values(endpoints).flatMap((feature) =>
        Object.values(feature).map((e: Endpoint) => `${e.method.toUpperCase()} /api/v1${e.path}`),
      ),
    );
    expect(
      [...mounted].filter((r) => !declared.has(r)).sort(),
      'mounted, not in contracts',
    ).toEqual([]);
    expect(
      [...declared].filter((r) => !mounted.has(r)).sort(),
      'in contracts, not mounted',
    ).toEqual([]);
    // Both lists were found at all (two empty lists would agree).
    expect(declared.size).toBeGreaterThan(50);
  });
});

describe('a declared route in the OpenAPI document', () => {
  it('types each path parameter and lists its query parameters from the schemas it parses with', async () => {
    const app = createTestApp(database.db);
    const document = (await request(app).get('/api/v1/openapi.json')).body as {
      paths: Record<
        string,
        Record<
          string,
          {
            parameters?: { name: string; in: string; schema: { format?: string; type?: string } }[];
          }
        >
      >;
    };
    const mortality = document.paths['/api/v1/flocks/{flockId}/mortality/{day}']?.['put'];
    const param = (name: string) => mortality?.parameters?.find((p) => p.name === name);
    expect(param('flockId')?.schema.type).toBe('integer');
    expect(param('day')?.schema.format).toBe('date');
    const map = document.paths['/api/v1/houses/{houseId}/map']?.['get'];
    expect(
      map?.parameters
        ?.filter((p) => p.in === 'query')
        .map((p) => p.name)
        .sort(),
    ).toEqual(['from', 'to', 'window']);
  });
});
