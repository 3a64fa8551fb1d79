/**
 * Prepares the demo simulator's farm files through the real API: signs in as the demo administrator,
 * gives each farm a gateway (reusing the key kept in .data/ while it still works) and lists its houses
 * and counters. The simulator then posts readings with those keys like a farm's own gateway would.
 */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import {
  farmSchema,
  gatewayCreatedSchema,
  houseSchema,
  houseWithCountersSchema,
  loginResponseSchema,
  type SimulatorFarm,
} from '@tierscope/contracts';
import { DEMO_PASSWORD } from '@tierscope/db/seed';
import { z } from 'zod';

interface Options {
  apiUrl: string;
  dataDir: string;
  flocks: Map<number, { hensHoused: number; flockAgeWeeks: number }>;
}

export async function prepareSimulatorFarms({
  apiUrl,
  dataDir,
  flocks,
}: Options): Promise<string[]> {
  const folder = join(dataDir, 'simulator');
  mkdirSync(folder, { recursive: true, mode: 0o700 });
  const keysFile = join(folder, 'keys.json');
  const keys = existsSync(keysFile)
    ? z.record(z.string(), z.string()).parse(JSON.parse(readFileSync(keysFile, 'utf8')))
    : {};

  const call = async <S extends z.ZodType>(
    schema: S,
    path: string,
    init: RequestInit = {},
    token?: string,
  ) => {
    const response = await fetch(`${apiUrl}${path}`, {
      ...init,
      headers: {
        'content-type': 'application/json',
        ...(token ? { authorization: `Bearer ${token}` } : {}),
      },
    });
    if (!response.ok)
      throw new Error(`${init.method ?? 'GET'} ${path} answered ${response.status}`);
    return schema.parse(await response.json());
  };
  const session = await call(loginResponseSchema, '/api/v1/auth/login', {
    method: 'POST',
    body: JSON.stringify({ email: 'admin@bramblewood.test', password: DEMO_PASSWORD }),
  });
  const token = session.token;
  const farms = await call(z.array(farmSchema), '/api/v1/farms', {}, token);
  const files: string[] = [];
  for (const farm of farms) {
    let key = keys[String(farm.id)];
    const isKeyWorking =
      key !== undefined &&
      (
        await fetch(`${apiUrl}/api/v1/ingest/readings`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
          body: JSON.stringify({ readings: [] }),
        })
      ).ok;
    if (!isKeyWorking) {
      const created = await call(
        gatewayCreatedSchema,
        `/api/v1/farms/${farm.id}/gateways`,
        { method: 'POST', body: JSON.stringify({ name: 'Demo simulator' }) },
        token,
      );
      key = created.key;
      keys[String(farm.id)] = key;
    }
    const houses = await call(z.array(houseSchema), `/api/v1/farms/${farm.id}/houses`, {}, token);
    const detailed = await Promise.all(
      houses.map((h) => call(houseWithCountersSchema, `/api/v1/houses/${h.id}`, {}, token)),
    );
    const simulatorFarm: SimulatorFarm = {
      farm: farm.name,
      apiUrl,
      gatewayKey: key ?? '',
      houses: detailed.map((h) => ({
        name: h.name,
        rows: h.rows,
        tiers: h.tiers,
        timezone: h.timezone,
        lightsOn: h.lightsOn,
        photoperiodHours: h.photoperiodHours,
        hensHoused: flocks.get(h.id)?.hensHoused ?? 30_000,
        flockAgeWeeks: flocks.get(h.id)?.flockAgeWeeks ?? 30,
        counters: h.counters.map((c) => ({
          externalId: c.externalId,
          kind: c.kind,
          row: c.row,
          tier: c.tier,
        })),
      })),
    };
    const file = join(folder, `farm-${farm.id}.json`);
    writeFileSync(file, JSON.stringify(simulatorFarm, null, 2), { mode: 0o600 });
    files.push(file);
  }
  writeFileSync(keysFile, JSON.stringify(keys, null, 2), { mode: 0o600 });
  return files;
}
