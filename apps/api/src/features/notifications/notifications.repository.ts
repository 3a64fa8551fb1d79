import type { NotificationSettings } from '@tierscope/contracts';
import { schema, type Queryable } from '@tierscope/db';
import type { Role } from '@tierscope/domain';
import { and, eq, gt, inArray, isNull, ne, sql } from 'drizzle-orm';

const { users, memberships, notificationSettings, exceptions, houses, farms, userTokens } = schema;

export type MailSetting = keyof NotificationSettings;

export interface Recipient {
  id: number;
  email: string;
  name: string;
}

const DEFAULT_SETTINGS: NotificationSettings = {
  newExceptions: true,
  workOrderAssigned: true,
  workOrderDone: true,
};

export async function settingsOf(db: Queryable, userId: number): Promise<NotificationSettings> {
  const [row] = await db
    .select()
    .from(notificationSettings)
    .where(eq(notificationSettings.userId, userId));
  return row
    ? {
        newExceptions: row.newExceptions,
        workOrderAssigned: row.workOrderAssigned,
        workOrderDone: row.workOrderDone,
      }
    : DEFAULT_SETTINGS;
}

export async function saveSettings(
  db: Queryable,
  userId: number,
  settings: NotificationSettings,
): Promise<void> {
  await db
    .insert(notificationSettings)
    .values({ userId, ...settings })
    .onConflictDoUpdate({
      target: notificationSettings.userId,
      set: { ...settings, updatedAt: new Date() },
    });
}

/** Enabled members of a farm holding one of `roles` who want `setting` mails (no row = they do). */
export async function farmRecipients(
  db: Queryable,
  farmId: number,
  roles: Role[],
  setting: MailSetting,
): Promise<Recipient[]> {
  const wants = sql<boolean>`coalesce(${notificationSettings[setting]}, true)`;
  return db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(notificationSettings, eq(notificationSettings.userId, users.id))
    .where(
      and(
        eq(memberships.farmId, farmId),
        inArray(memberships.role, roles),
        eq(users.disabled, false),
        wants,
      ),
    );
}

/** One user, when enabled and wanting `setting` mails; undefined otherwise. */
export async function userRecipient(
  db: Queryable,
  userId: number,
  setting: MailSetting | null,
): Promise<Recipient | undefined> {
  const [row] = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      disabled: users.disabled,
      wants: setting
        ? sql<boolean>`coalesce(${notificationSettings[setting]}, true)`
        : sql<boolean>`true`,
    })
    .from(users)
    .leftJoin(notificationSettings, eq(notificationSettings.userId, users.id))
    .where(eq(users.id, userId));
  if (!row || row.disabled || !row.wants) return undefined;
  return { id: row.id, email: row.email, name: row.name };
}

/**
 * Takes the exceptions no one has been mailed about yet (live, past learning) and stamps them in the
 * same statement, so two flushes can never mail one exception twice.
 */
export async function claimExceptionsToMail(db: Queryable) {
  const claimed = await db
    .update(exceptions)
    .set({ notifiedAt: new Date() })
    .where(
      and(
        isNull(exceptions.notifiedAt),
        ne(exceptions.status, 'closed'),
        eq(exceptions.isLearning, false),
      ),
    )
    .returning();
  if (claimed.length === 0) return [];
  const houseRows = await db
    .select({
      id: houses.id,
      name: houses.name,
      timezone: houses.timezone,
      farmName: farms.name,
      pricePerDozen: houses.eggPricePerDozen,
    })
    .from(houses)
    .innerJoin(farms, eq(farms.id, houses.farmId))
    .where(
      inArray(
        houses.id,
        claimed.map((e) => e.houseId),
      ),
    );
  const byId = new Map(houseRows.map((h) => [h.id, h]));
  return claimed.flatMap((e) => {
    const house = byId.get(e.houseId);
    return house ? [{ exception: e, house }] : [];
  });
}

/** Gives claimed exceptions back when their mail could not be sent, so the next flush tries again. */
export async function releaseExceptions(db: Queryable, ids: number[]): Promise<void> {
  if (ids.length === 0) return;
  await db.update(exceptions).set({ notifiedAt: null }).where(inArray(exceptions.id, ids));
}

export async function insertUserToken(
  db: Queryable,
  token: {
    userId: number;
    purpose: 'invitation' | 'password_reset';
    tokenHash: string;
    expiresAt: Date;
  },
): Promise<void> {
  // A new link retires the user's older unused links of the same purpose.
  await db
    .update(userTokens)
    .set({ usedAt: new Date() })
    .where(
      and(
        eq(userTokens.userId, token.userId),
        eq(userTokens.purpose, token.purpose),
        isNull(userTokens.usedAt),
      ),
    );
  await db.insert(userTokens).values(token);
}

/** Uses a link once: marks it used and answers its user, or undefined when unknown, used or expired. */
export async function consumeUserToken(
  db: Queryable,
  tokenHash: string,
): Promise<{ userId: number; purpose: 'invitation' | 'password_reset' } | undefined> {
  const [row] = await db
    .update(userTokens)
    .set({ usedAt: new Date() })
    .where(
      and(
        eq(userTokens.tokenHash, tokenHash),
        isNull(userTokens.usedAt),
        gt(userTokens.expiresAt, new Date()),
      ),
    )
    .returning({ userId: userTokens.userId, purpose: userTokens.purpose });
  return row;
}

export async function setPasswordHash(
  db: Queryable,
  userId: number,
  passwordHash: string,
): Promise<void> {
  // A new password retires every token issued before it.
  await db
    .update(users)
    .set({ passwordHash, sessionVersion: sql`${users.sessionVersion} + 1` })
    .where(eq(users.id, userId));
}
