import type { Role } from '@tierscope/domain';
import { schema, type Queryable } from '@tierscope/db';
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import type { AuthUser } from '../../platform/auth';

const { users, memberships, farms } = schema;

export type UserRow = typeof users.$inferSelect;

export async function findUserByEmail(db: Queryable, email: string): Promise<UserRow | undefined> {
  const [row] = await db
    .select()
    .from(users)
    .where(sql`lower(${users.email}) = lower(${email})`);
  return row;
}

export async function findUserById(db: Queryable, id: number): Promise<UserRow | undefined> {
  const [row] = await db.select().from(users).where(eq(users.id, id));
  return row;
}

export async function membershipsOf(db: Queryable, userId: number) {
  return db
    .select({ farmId: memberships.farmId, farmName: farms.name, role: memberships.role })
    .from(memberships)
    .innerJoin(farms, eq(farms.id, memberships.farmId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(farms.name));
}

/** The user behind a token, or null when they no longer exist or are disabled. */
export async function loadActiveUser(db: Queryable, id: number): Promise<AuthUser | null> {
  const user = await findUserById(db, id);
  if (!user || user.disabled) return null;
  const list = await membershipsOf(db, id);
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    roles: new Map(list.map((m) => [m.farmId, m.role])),
    sessionVersion: user.sessionVersion,
  };
}

/** Users holding any role on one of `farmIds`, with all their memberships on those farms. */
export async function listUsersOfFarms(db: Queryable, farmIds: number[]) {
  if (farmIds.length === 0) return [];
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      disabled: users.disabled,
      createdAt: users.createdAt,
      farmId: memberships.farmId,
      role: memberships.role,
    })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .where(inArray(memberships.farmId, farmIds))
    .orderBy(asc(users.name), asc(users.id));
  const byId = new Map<
    number,
    Omit<UserRow, 'passwordHash' | 'sessionVersion'> & {
      memberships: { farmId: number; role: Role }[];
    }
  >();
  for (const row of rows) {
    const entry = byId.get(row.id) ?? {
      id: row.id,
      email: row.email,
      name: row.name,
      disabled: row.disabled,
      createdAt: row.createdAt,
      memberships: [],
    };
    entry.memberships.push({ farmId: row.farmId, role: row.role });
    byId.set(row.id, entry);
  }
  return [...byId.values()];
}

export async function insertUser(
  db: Queryable,
  input: { email: string; name: string; passwordHash: string },
): Promise<UserRow> {
  const [row] = await db.insert(users).values(input).returning();
  if (!row) throw new Error('insert into users returned no row');
  return row;
}

export async function updateUser(
  db: Queryable,
  id: number,
  patch: Partial<Pick<UserRow, 'name' | 'disabled'>>,
): Promise<UserRow | undefined> {
  const [row] = await db.update(users).set(patch).where(eq(users.id, id)).returning();
  return row;
}

/** Replaces the user's memberships on `farmIds` with `wanted`; memberships on other farms stay. */
export async function replaceMemberships(
  db: Queryable,
  userId: number,
  farmIds: number[],
  wanted: { farmId: number; role: Role }[],
): Promise<void> {
  if (farmIds.length > 0) {
    await db
      .delete(memberships)
      .where(and(eq(memberships.userId, userId), inArray(memberships.farmId, farmIds)));
  }
  if (wanted.length > 0) {
    await db.insert(memberships).values(wanted.map((m) => ({ userId, ...m })));
  }
}
