import { createServer, type Server } from 'node:http';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync, deflateSync } from 'node:zlib';
import { createTestDatabase } from '@tierscope/db/testing';
import { ROLES, type Role } from '@tierscope/domain';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedFixture, type Fixture } from '../../apps/api/src/testing/fixtures';
import { bearerFor } from '../../apps/api/src/testing/sign-in';
import { createTestApp } from '../../apps/api/src/testing/test-app';
import {
  BAD_FIELD_VALUES,
  BAD_PATH_VALUES,
  BAD_QUERY_VALUES,
  BAD_RAW_BODIES,
  QUERY_KEYS,
  randomBodies,
} from './corpus';
import { fingerprint, pathValues, seedFarmObjects, type FarmObjects } from './seed';

/**
 * The robustness corpus, walked over every route of the OpenAPI document: every role with another farm's
 * ids, no sign-in, and malformed input of every class the hardening issue found. Whatever is sent, the API
 * answers 4xx (never 5xx), never hands another farm's objects out, stays healthy, and a refused request
 * changes nothing stored.
 */
interface Operation {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  isPublic: boolean;
  isGateway: boolean;
  bodyFields: string[] | null;
}

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let fixture: Fixture;
let server: Server;
let dataDir: string;
let own: FarmObjects;
let foreign: FarmObjects;
const bearers = {} as Record<Role, string>;

/** Every operation of the OpenAPI document the app serves (all mounted routes: the drift test sees to that). */
const operationsOf = (document: { paths: Record<string, object> }): Operation[] =>
  Object.entries(document.paths).flatMap(([path, methods]) =>
    Object.entries(methods).map(([method, raw]) => {
      const op = raw as {
        security?: Record<string, unknown>[];
        requestBody?: {
          content: Record<string, { schema: { properties?: object } } | undefined>;
        };
      };
      // JSON bodies only: a multipart upload is walked by the encodings test.
      const schema = op.requestBody?.content['application/json']?.schema;
      return {
        method: method as Operation['method'],
        path,
        isPublic: !op.security,
        isGateway: op.security?.some((s) => 'gatewayKey' in s) ?? false,
        bodyFields: schema ? Object.keys(schema.properties ?? {}) : null,
      };
    }),
  );
let operations: Operation[] = [];

beforeAll(async () => {
  database = await createTestDatabase();
  fixture = await seedFixture(database.db);
  ({ own, foreign } = await seedFarmObjects(database.db, fixture));
  dataDir = mkdtempSync(join(tmpdir(), 'tierscope-robustness-'));
  const app = createTestApp(database.db, { config: { dataDir } });
  server = createServer(app);
  operations = operationsOf(
    (await request(app).get('/api/v1/openapi.json')).body as { paths: Record<string, object> },
  );
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  for (const role of ROLES) bearers[role] = await bearerFor(app, fixture.usersA[role].email);
});

afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
  await database.drop();
  rmSync(dataDir, { recursive: true, force: true });
});

function urlOf(op: Operation, values: Record<string, string>): string {
  return op.path.replace(/\{(\w+)\}/g, (_, name: string) => values[name] ?? '1');
}

function send(
  op: Operation,
  url: string,
  options: { auth?: string; body?: string | Buffer; headers?: Record<string, string> } = {},
): request.Test {
  let test = request(server)[op.method](url);
  const auth = options.auth ?? (op.isGateway ? `Bearer ${own.gatewayKey}` : bearers.admin);
  if (auth) test = test.set('Authorization', auth);
  for (const [name, value] of Object.entries(options.headers ?? {})) test = test.set(name, value);
  if (options.body !== undefined) {
    if (!options.headers?.['Content-Type']) test = test.set('Content-Type', 'application/json');
    test = test.send(options.body);
  }
  return test;
}

/** Failures gathered over a whole sweep, so one run lists every route that misbehaves. */
class Findings {
  readonly list: string[] = [];
  check(what: string, status: number, isAllowed: (status: number) => boolean): void {
    if (!isAllowed(status)) this.list.push(`${what} → ${status}`);
  }
}

const isNotServerError = (status: number) => status < 500;
const isRefused = (status: number) => status >= 400 && status < 500;
const writes = (op: Operation) => op.method !== 'get';

describe('every route of the OpenAPI document', () => {
  it('is walked (the document lists the routes the corpus covers)', () => {
    expect(operations.length).toBeGreaterThan(50);
    expect(operations.some((o) => o.path === '/api/v1/exceptions/{exceptionId}/close')).toBe(true);
  });

  it('answers 401 without a sign-in, except the public routes', async () => {
    const findings = new Findings();
    for (const op of operations.filter((o) => !o.isPublic)) {
      const response = await send(op, urlOf(op, pathValues(own)), { auth: '' });
      findings.check(
        `${op.method} ${op.path} without a sign-in`,
        response.status,
        (s) => s === 401,
      );
      const forged = await send(op, urlOf(op, pathValues(own)), {
        auth: 'Bearer eyJhbGciOiJub25lIn0.eyJzdWIiOiIxIn0.',
      });
      findings.check(
        `${op.method} ${op.path} with a forged token`,
        forged.status,
        (s) => s === 401,
      );
    }
    expect(findings.list).toEqual([]);
  });

  it("never answers 2xx, for any role, to another farm's ids, and changes nothing of it", async () => {
    const findings = new Findings();
    const before = await fingerprint(database.db);
    for (const op of operations.filter((o) => !o.isPublic && o.path.includes('{'))) {
      for (const role of ROLES) {
        const response = await send(op, urlOf(op, pathValues(foreign)), {
          auth: bearers[role],
          ...(op.bodyFields ? { body: '{}' } : {}),
        });
        findings.check(`${role} ${op.method} ${op.path} on farm B`, response.status, isRefused);
      }
    }
    expect(findings.list).toEqual([]);
    expect(await fingerprint(database.db)).toEqual(before);
  });

  it("never lists another farm's objects when a query names that farm or its house", async () => {
    const findings = new Findings();
    for (const op of operations.filter((o) => o.method === 'get' && !o.isPublic)) {
      for (const role of ROLES) {
        for (const query of [`farmId=${foreign.farmId}`, `houseId=${foreign.houseId}`]) {
          const response = await send(op, `${urlOf(op, pathValues(own))}?${query}`, {
            auth: bearers[role],
          });
          findings.check(`${role} GET ${op.path}?${query}`, response.status, isNotServerError);
          const text = response.text;
          if (
            response.status < 300 &&
            (text.includes(`"farmId":${foreign.farmId},`) ||
              text.includes(`"houseId":${foreign.houseId},`))
          ) {
            findings.list.push(`${role} GET ${op.path}?${query} answered farm B's objects`);
          }
        }
      }
    }
    expect(findings.list).toEqual([]);
  });

  it('refuses malformed path values with a 4xx', async () => {
    const findings = new Findings();
    const before = await fingerprint(database.db);
    for (const op of operations.filter((o) => o.path.includes('{'))) {
      const names = [...op.path.matchAll(/\{(\w+)\}/g)].map((m) => m[1] ?? '');
      for (const name of names) {
        for (const bad of BAD_PATH_VALUES) {
          const url = urlOf(op, { ...pathValues(own), [name]: bad });
          const response = await send(op, url);
          findings.check(
            `${op.method} ${op.path} with ${name}=${bad.slice(0, 24)}`,
            response.status,
            isRefused,
          );
        }
      }
    }
    expect(findings.list).toEqual([]);
    expect(await fingerprint(database.db)).toEqual(before);
  });

  it('never fails on malformed query values', { timeout: 180_000 }, async () => {
    const findings = new Findings();
    const nastiest = ['2147483648', '%00', '0000-01-01', '275760-09-13T00:00:00Z'];
    for (const op of operations) {
      const base = urlOf(op, pathValues(own));
      const extra = op.bodyFields ? { body: '{}' } : {};
      // Every key at once with each bad value (zod reports every field, so none hides another)…
      for (const bad of BAD_QUERY_VALUES) {
        const query = QUERY_KEYS.map((key) => `${key}=${bad}&${key}[x]=1`).join('&');
        const response = await send(op, `${base}?${query}`, extra);
        findings.check(
          `${op.method} ${op.path}?*=${bad.slice(0, 24)}`,
          response.status,
          isNotServerError,
        );
      }
      // …and each key alone with the nastiest, beside otherwise valid input.
      for (const key of QUERY_KEYS) {
        for (const bad of nastiest) {
          const response = await send(op, `${base}?${key}=${bad}`, extra);
          findings.check(
            `${op.method} ${op.path}?${key}=${bad}`,
            response.status,
            isNotServerError,
          );
        }
      }
    }
    expect(findings.list).toEqual([]);
  });

  it('refuses malformed JSON bodies with a 4xx and keeps what is stored', async () => {
    const findings = new Findings();
    for (const op of operations.filter((o) => writes(o) && o.bodyFields)) {
      for (const bad of BAD_RAW_BODIES) {
        const before = await fingerprint(database.db);
        const response = await send(op, urlOf(op, pathValues(own)), { body: bad.text });
        findings.check(`${op.method} ${op.path} with ${bad.name}`, response.status, isRefused);
        if (isRefused(response.status) && op.path !== '/api/v1/ingest/readings') {
          const after = await fingerprint(database.db);
          if (JSON.stringify(after) !== JSON.stringify(before)) {
            findings.list.push(
              `${op.method} ${op.path} with ${bad.name} changed data while refusing`,
            );
          }
        }
      }
    }
    expect(findings.list).toEqual([]);
  });

  it('never fails on wrong values in any field of a body', async () => {
    const findings = new Findings();
    for (const op of operations.filter((o) => writes(o) && o.bodyFields?.length)) {
      for (const field of op.bodyFields ?? []) {
        for (const value of BAD_FIELD_VALUES) {
          const before = await fingerprint(database.db);
          const body = JSON.stringify({ [field]: value });
          const response = await send(op, urlOf(op, pathValues(own)), { body });
          findings.check(
            `${op.method} ${op.path} with ${field}=${body.slice(0, 40)}`,
            response.status,
            isNotServerError,
          );
          if (isRefused(response.status) && op.path !== '/api/v1/ingest/readings') {
            if (JSON.stringify(await fingerprint(database.db)) !== JSON.stringify(before)) {
              findings.list.push(
                `${op.method} ${op.path} with ${field} changed data while refusing`,
              );
            }
          }
        }
      }
    }
    expect(findings.list).toEqual([]);
  }, 90_000); // every field of every write, each with the data fingerprinted before and after

  it('never fails on seeded random JSON (fast-check)', async () => {
    const findings = new Findings();
    const bodies = randomBodies(20261202, 25);
    for (const op of operations.filter((o) => writes(o) && o.bodyFields)) {
      for (const value of bodies) {
        const response = await send(op, urlOf(op, pathValues(own)), {
          body: JSON.stringify(value),
        });
        findings.check(
          `${op.method} ${op.path} with ${JSON.stringify(value).slice(0, 60)}`,
          response.status,
          isNotServerError,
        );
      }
    }
    expect(findings.list).toEqual([]);
  });

  it('answers 4xx to bodies in encodings or types it does not take', async () => {
    const findings = new Findings();
    const json = Buffer.from('{"name":"x"}');
    const cases: { name: string; body: Buffer; headers: Record<string, string> }[] = [
      {
        name: 'gzip of junk',
        body: Buffer.from('not gzip at all'),
        headers: { 'Content-Encoding': 'gzip' },
      },
      {
        name: 'deflate of junk',
        body: Buffer.from([1, 2, 3, 4]),
        headers: { 'Content-Encoding': 'deflate' },
      },
      { name: 'brotli of junk', body: Buffer.from('xx'), headers: { 'Content-Encoding': 'br' } },
      { name: 'unknown encoding', body: json, headers: { 'Content-Encoding': 'xz' } },
      {
        name: 'gzip bomb',
        body: gzipSync(Buffer.alloc(20 * 1024 * 1024, 32)),
        headers: { 'Content-Encoding': 'gzip' },
      },
      {
        name: 'UTF-16 charset',
        body: json,
        headers: { 'Content-Type': 'application/json; charset=utf-16' },
      },
      {
        name: 'unknown charset',
        body: json,
        headers: { 'Content-Type': 'application/json; charset=klingon' },
      },
      { name: 'plain text', body: json, headers: { 'Content-Type': 'text/plain' } },
      {
        name: 'invalid UTF-8',
        body: Buffer.from([0x7b, 0x22, 0x6e, 0x22, 0x3a, 0x22, 0xff, 0xfe, 0x22, 0x7d]),
        headers: {},
      },
    ];
    for (const op of operations.filter((o) => writes(o))) {
      for (const c of cases) {
        const response = await send(op, urlOf(op, pathValues(foreign)), {
          body: c.body,
          headers: { 'Content-Type': 'application/json', ...c.headers },
        });
        findings.check(`${op.method} ${op.path} with ${c.name}`, response.status, isRefused);
      }
      // A well-formed compressed body is read as the same JSON: never a 5xx.
      const zipped = await send(op, urlOf(op, pathValues(own)), {
        body: deflateSync(Buffer.from('{}')),
        headers: { 'Content-Type': 'application/json', 'Content-Encoding': 'deflate' },
      });
      findings.check(
        `${op.method} ${op.path} with a deflated body`,
        zipped.status,
        isNotServerError,
      );
    }
    expect(findings.list).toEqual([]);
  });

  it('is still healthy after the whole corpus', async () => {
    expect((await request(server).get('/api/health')).status).toBe(200);
    const farms = await request(server).get('/api/v1/farms').set('Authorization', bearers.admin);
    expect(farms.status).toBe(200);
  });
});
