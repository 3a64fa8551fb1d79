import { hash } from '@node-rs/argon2';
import { insertHouseWithLayout, schema, type Database } from '@tierscope/db';
import type { ExceptionStatus, Role } from '@tierscope/domain';
import { ROLES } from '@tierscope/domain';

export const FIXTURE_PASSWORD = 'correct horse battery';

export interface Fixture {
  farmA: number;
  farmB: number;
  houseA: number;
  houseB: number;
  /** one user per role on farm A */
  usersA: Record<Role, { id: number; email: string }>;
  /** an admin of farm B only */
  adminB: { id: number; email: string };
}

/** Two farms with a house each, a user of every role on farm A and an admin on farm B. */
export async function seedFixture(db: Database): Promise<Fixture> {
  const passwordHash = await hash(FIXTURE_PASSWORD);
  const [farmA] = await db.insert(schema.farms).values({ name: 'Farm A' }).returning();
  const [farmB] = await db.insert(schema.farms).values({ name: 'Farm B' }).returning();
  if (!farmA || !farmB) throw new Error('fixture farms not created');
  const layout = {
    rows: 4,
    tiers: 3,
    timezone: 'America/Chicago',
    lightsOn: '04:00',
    photoperiodHours: 16,
    shortfallThresholdPct: 10,
  };
  const houseA = await insertHouseWithLayout(db, farmA.id, { name: 'A1', ...layout });
  const houseB = await insertHouseWithLayout(db, farmB.id, { name: 'B1', ...layout });
  const usersA = {} as Record<Role, { id: number; email: string }>;
  for (const role of ROLES) {
    const email = `${role}@farm-a.test`;
    const [user] = await db
      .insert(schema.users)
      .values({ email, name: `${role} of A`, passwordHash })
      .returning();
    if (!user) throw new Error('fixture user not created');
    await db.insert(schema.memberships).values({ userId: user.id, farmId: farmA.id, role });
    usersA[role] = { id: user.id, email };
  }
  const [adminB] = await db
    .insert(schema.users)
    .values({ email: 'admin@farm-b.test', name: 'admin of B', passwordHash })
    .returning();
  if (!adminB) throw new Error('fixture user not created');
  await db
    .insert(schema.memberships)
    .values({ userId: adminB.id, farmId: farmB.id, role: 'admin' });
  return {
    farmA: farmA.id,
    farmB: farmB.id,
    houseA: houseA.id,
    houseB: houseB.id,
    usersA,
    adminB: { id: adminB.id, email: adminB.email },
  };
}

let exceptionSeconds = 0;

/** An exception as the shortfall engine would open it, for suites that act on exceptions. */
export async function insertTestException(
  db: Database,
  values: {
    farmId: number;
    houseId: number;
    kind?: 'shortfall' | 'silent_counter' | 'collector_gap' | 'house_dip';
    scope?: 'section' | 'row' | 'tier' | 'house';
    row?: number | null;
    tier?: number | null;
    isLearning?: boolean;
    status?: ExceptionStatus;
  },
) {
  exceptionSeconds += 1;
  const openedAt = new Date(Date.now() - 3600_000 - exceptionSeconds * 1000);
  const [row] = await db
    .insert(schema.exceptions)
    .values({
      farmId: values.farmId,
      houseId: values.houseId,
      kind: values.kind ?? 'shortfall',
      scope: values.scope ?? 'section',
      row: values.row ?? null,
      tier: values.tier ?? null,
      status: values.status ?? 'open',
      isLearning: values.isLearning ?? false,
      openedAt,
      openedDay: openedAt.toISOString().slice(0, 10),
      eggs: 850,
      expected: 1000,
      ratio: 0.85,
      pValue: 1e-6,
      worstRatio: 0.85,
      atOpen: {},
      lastEvaluatedAt: openedAt,
      ...(values.status === 'closed' ? { closedAt: new Date(), closeReason: 'recovered' } : {}),
    } as typeof schema.exceptions.$inferInsert)
    .returning();
  if (!row) throw new Error('test exception not inserted');
  return row;
}
