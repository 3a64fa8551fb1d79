import { schema, type Queryable } from '@tierscope/db';
import { and, desc, eq, gte, inArray, isNull, lte, ne, or, sql, type SQL } from 'drizzle-orm';

/** Exceptions as rows: opened and brought up to date by the engine, read by the map, the lists and the mails. */
const { exceptions, houses, users } = schema;

export type ExceptionRow = typeof exceptions.$inferSelect;

export type NewException = typeof exceptions.$inferInsert;

/** Opens an exception; the same spot opened at the same instant (a re-evaluation) is found, not doubled. */
export async function openException(
  db: Queryable,
  values: NewException,
): Promise<ExceptionRow | undefined> {
  const [row] = await db.insert(exceptions).values(values).onConflictDoNothing().returning();
  return row;
}

export async function updateException(
  db: Queryable,
  farmId: number,
  id: number,
  patch: Partial<NewException>,
) {
  const [row] = await db
    .update(exceptions)
    .set(patch)
    .where(and(eq(exceptions.farmId, farmId), eq(exceptions.id, id)))
    .returning();
  return row;
}

export async function findException(db: Queryable, id: number): Promise<ExceptionRow | undefined> {
  const [row] = await db.select().from(exceptions).where(eq(exceptions.id, id));
  return row;
}

export async function listExceptions(
  db: Queryable,
  filter: {
    farmIds: number[];
    houseId?: number;
    status?: string;
    kind?: string;
    from?: string;
    to?: string;
  },
) {
  if (filter.farmIds.length === 0) return [];
  const conditions: SQL[] = [inArray(exceptions.farmId, filter.farmIds)];
  if (filter.houseId !== undefined) conditions.push(eq(exceptions.houseId, filter.houseId));
  if (filter.status === 'live') conditions.push(ne(exceptions.status, 'closed'));
  else if (filter.status) conditions.push(sql`${exceptions.status} = ${filter.status}`);
  if (filter.kind) conditions.push(sql`${exceptions.kind} = ${filter.kind}`);
  if (filter.from)
    conditions.push(sql`coalesce(${exceptions.closedAt}, now()) >= ${filter.from}::timestamptz`);
  if (filter.to) conditions.push(sql`${exceptions.openedAt} <= ${filter.to}::timestamptz`);
  return db
    .select({
      exception: exceptions,
      houseName: houses.name,
      timezone: houses.timezone,
      pricePerDozen: houses.eggPricePerDozen,
      acknowledgedByName: users.name,
    })
    .from(exceptions)
    .innerJoin(houses, eq(houses.id, exceptions.houseId))
    .leftJoin(users, eq(users.id, exceptions.acknowledgedBy))
    .where(and(...conditions))
    .orderBy(desc(exceptions.openedAt))
    .limit(500);
}

/** Exceptions that were open at instant `at` (for now: the live ones; for a past checkpoint: as they were then). */
export async function exceptionsOpenAt(
  db: Queryable,
  houseId: number,
  at: Date,
): Promise<ExceptionRow[]> {
  return db
    .select()
    .from(exceptions)
    .where(
      and(
        eq(exceptions.houseId, houseId),
        lte(exceptions.openedAt, at),
        or(
          isNull(exceptions.closedAt),
          sql`${exceptions.closedAt} > ${at.toISOString()}::timestamptz`,
        ),
      ),
    );
}

export async function liveExceptions(db: Queryable, houseId: number): Promise<ExceptionRow[]> {
  return db
    .select()
    .from(exceptions)
    .where(and(eq(exceptions.houseId, houseId), ne(exceptions.status, 'closed')));
}

/** Exceptions of a house that were open at some point in [from, to). */
export async function exceptionsOverlapping(
  db: Queryable,
  houseId: number,
  from: Date,
  to: Date,
): Promise<ExceptionRow[]> {
  return db
    .select()
    .from(exceptions)
    .where(
      and(
        eq(exceptions.houseId, houseId),
        lte(exceptions.openedAt, to),
        or(isNull(exceptions.closedAt), gte(exceptions.closedAt, from)),
      ),
    );
}
