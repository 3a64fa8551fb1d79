import { schema, type Database } from '@tierscope/db';
import { sql } from 'drizzle-orm';
import { insertGateway } from '../../apps/api/src/features/gateways/gateways.repository';
import { newGatewayKey } from '../../apps/api/src/platform/gateway-keys';
import { insertTestException, type Fixture } from '../../apps/api/src/testing/fixtures';
import { longMapping } from '../../apps/api/src/testing/imports';

const IMPORT_MAPPING = longMapping('UTC', 'ts');

/** One object of every kind a route's path names, on one farm. */
export interface FarmObjects {
  farmId: number;
  houseId: number;
  userId: number;
  gatewayId: number;
  gatewayKey: string;
  workOrderId: number;
  itemId: number;
  photoId: number;
  importId: number;
  mappingId: number;
  flockId: number;
  exceptionId: number;
}

/** Gives each of the fixture's two farms one of everything, so every path parameter has an id to name. */
export async function seedFarmObjects(
  db: Database,
  fixture: Fixture,
): Promise<{ own: FarmObjects; foreign: FarmObjects }> {
  const make = async (farmId: number, houseId: number, userId: number): Promise<FarmObjects> => {
    const key = newGatewayKey();
    const gateway = await insertGateway(db, {
      farmId,
      name: `gateway of ${farmId}`,
      keyHash: key.hash,
      keyPrefix: key.prefix,
      createdBy: userId,
    });
    const [order] = await db
      .insert(schema.workOrders)
      .values({ farmId, houseId, title: 'check the feed line', createdBy: userId })
      .returning();
    const [item] = await db
      .insert(schema.workOrderChecklistItems)
      .values({ workOrderId: order!.id, position: 1, label: 'look at the trough' })
      .returning();
    const [photo] = await db
      .insert(schema.workOrderPhotos)
      .values({
        workOrderId: order!.id,
        farmId,
        storedName: 'missing.png',
        originalName: 'feeder.png',
        contentType: 'image/png',
        bytes: 10,
      })
      .returning();
    const [imported] = await db
      .insert(schema.imports)
      .values({
        farmId,
        houseId,
        storedName: 'gone.csv',
        fileName: 'export.csv',
        bytes: 10,
        mapping: IMPORT_MAPPING,
        state: 'done',
      })
      .returning();
    const [mapping] = await db
      .insert(schema.importMappings)
      .values({ farmId, name: 'counter export', mapping: IMPORT_MAPPING })
      .returning();
    const [flock] = await db
      .insert(schema.flocks)
      .values({ houseId, placedOn: '2026-06-01', hensHoused: 20_000, ageAtPlacementWeeks: 17 })
      .returning();
    const exception = await insertTestException(db, { farmId, houseId, row: 1, tier: 1 });
    return {
      farmId,
      houseId,
      userId,
      gatewayId: gateway.id,
      gatewayKey: key.key,
      workOrderId: order!.id,
      itemId: item!.id,
      photoId: photo!.id,
      importId: imported!.id,
      mappingId: mapping!.id,
      flockId: flock!.id,
      exceptionId: exception.id,
    };
  };
  return {
    own: await make(fixture.farmA, fixture.houseA, fixture.usersA.admin.id),
    foreign: await make(fixture.farmB, fixture.houseB, fixture.adminB.id),
  };
}

/** Path parameter name → the id of that kind among a farm's objects. */
export function pathValues(objects: FarmObjects): Record<string, string> {
  return {
    farmId: String(objects.farmId),
    houseId: String(objects.houseId),
    userId: String(objects.userId),
    gatewayId: String(objects.gatewayId),
    workOrderId: String(objects.workOrderId),
    itemId: String(objects.itemId),
    photoId: String(objects.photoId),
    importId: String(objects.importId),
    mappingId: String(objects.mappingId),
    flockId: String(objects.flockId),
    exceptionId: String(objects.exceptionId),
    row: '1',
    tier: '1',
    day: '2026-11-01',
  };
}

/**
 * A digest of everything stored, table by table (gateways without their "last used" stamp, which a
 * refused gateway call may still touch; not the processes' own bookkeeping — the sign-in limiter's counts,
 * which a refused sign-in must raise, leases and large events). Equal before and after means a request
 * changed nothing.
 */
export async function fingerprint(db: Database): Promise<Record<string, string>> {
  const tables = await db.execute<{ name: string }>(sql`
    select c.relname as name from pg_class c join pg_namespace n on n.oid = c.relnamespace
    where n.nspname = 'public' and c.relkind in ('r', 'p') and not c.relispartition
      and c.relname not like '__drizzle%'
      and c.relname not in ('rate_limit_hits', 'leases', 'event_payloads')
    order by 1`);
  const parts = tables.rows.map(({ name }) => {
    const source =
      name === 'gateways'
        ? sql`(select id, farm_id, name, key_hash, revoked_at from gateways) t`
        : sql.raw(`"${name}" t`);
    return sql`select ${name} as name, md5(coalesce(string_agg(t::text, ',' order by t::text), '')) as digest from ${source}`;
  });
  const result = await db.execute<{ name: string; digest: string }>(
    sql.join(parts, sql` union all `),
  );
  return Object.fromEntries(result.rows.map((r) => [r.name, r.digest]));
}
