import { schema, type Queryable } from '@tierscope/db';
import { and, asc, eq, isNull, lt, or, sql } from 'drizzle-orm';

const { gateways } = schema;

export type GatewayRow = typeof gateways.$inferSelect;

export async function listGateways(db: Queryable, farmId: number): Promise<GatewayRow[]> {
  return db
    .select()
    .from(gateways)
    .where(eq(gateways.farmId, farmId))
    .orderBy(asc(gateways.name), asc(gateways.id));
}

export async function findGateway(db: Queryable, id: number): Promise<GatewayRow | undefined> {
  const [row] = await db.select().from(gateways).where(eq(gateways.id, id));
  return row;
}

export async function insertGateway(
  db: Queryable,
  input: { farmId: number; name: string; keyHash: string; keyPrefix: string; createdBy: number },
): Promise<GatewayRow> {
  const [row] = await db.insert(gateways).values(input).returning();
  if (!row) throw new Error('insert into gateways returned no row');
  return row;
}

export async function revokeGateway(db: Queryable, id: number): Promise<GatewayRow | undefined> {
  const [row] = await db
    .update(gateways)
    .set({ revokedAt: sql`coalesce(${gateways.revokedAt}, now())` })
    .where(eq(gateways.id, id))
    .returning();
  return row;
}

/** The live (not revoked) gateway holding this key hash. */
export async function findActiveGatewayByHash(db: Queryable, keyHash: string) {
  const [row] = await db
    .select({ id: gateways.id, farmId: gateways.farmId, lastUsedAt: gateways.lastUsedAt })
    .from(gateways)
    .where(and(eq(gateways.keyHash, keyHash), isNull(gateways.revokedAt)));
  return row;
}

/** Records use at most once a minute, so a busy gateway does not turn its row into a hot spot. */
export async function touchGateway(db: Queryable, id: number): Promise<void> {
  await db
    .update(gateways)
    .set({ lastUsedAt: sql`now()` })
    .where(
      and(
        eq(gateways.id, id),
        or(isNull(gateways.lastUsedAt), lt(gateways.lastUsedAt, sql`now() - interval '1 minute'`)),
      ),
    );
}
