import { schema, type Queryable } from '@tierscope/db';
import type { Role } from '@tierscope/domain';
import { asc, eq, inArray, sql } from 'drizzle-orm';

const { farms, houses, memberships } = schema;

export type FarmRow = typeof farms.$inferSelect;

/** The farms a user belongs to, with their role and how many houses each has. */
export async function listFarmsOfUser(db: Queryable, userId: number) {
  return db
    .select({
      id: farms.id,
      name: farms.name,
      currency: farms.currency,
      createdAt: farms.createdAt,
      role: memberships.role,
      houseCount: sql<number>`(select count(*)::int from ${houses} where ${houses.farmId} = ${farms.id})`,
    })
    .from(farms)
    .innerJoin(memberships, eq(memberships.farmId, farms.id))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(farms.name));
}

export async function findFarm(db: Queryable, id: number) {
  const [row] = await db
    .select({
      id: farms.id,
      name: farms.name,
      currency: farms.currency,
      createdAt: farms.createdAt,
      houseCount: sql<number>`(select count(*)::int from ${houses} where ${houses.farmId} = ${farms.id})`,
    })
    .from(farms)
    .where(eq(farms.id, id));
  return row;
}

export async function insertFarm(
  db: Queryable,
  values: { name: string; currency: string },
): Promise<FarmRow> {
  const [row] = await db.insert(farms).values(values).returning();
  if (!row) throw new Error('insert into farms returned no row');
  return row;
}

export async function updateFarm(
  db: Queryable,
  id: number,
  patch: { name?: string; currency?: string },
) {
  const [row] = await db.update(farms).set(patch).where(eq(farms.id, id)).returning();
  return row;
}

export async function addMembership(
  db: Queryable,
  userId: number,
  farmId: number,
  role: Role,
): Promise<void> {
  await db.insert(memberships).values({ userId, farmId, role });
}

export async function existingFarmIds(db: Queryable, ids: number[]): Promise<number[]> {
  if (ids.length === 0) return [];
  const rows = await db.select({ id: farms.id }).from(farms).where(inArray(farms.id, ids));
  return rows.map((r) => r.id);
}

export async function existingFarmNames(db: Queryable, ids: number[]): Promise<string[]> {
  if (ids.length === 0) return [];
  const rows = await db
    .select({ name: farms.name })
    .from(farms)
    .where(inArray(farms.id, ids))
    .orderBy(farms.name);
  return rows.map((r) => r.name);
}
