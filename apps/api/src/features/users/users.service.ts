import { randomBytes } from 'node:crypto';
import { hash } from '@node-rs/argon2';
import type { User, UserCreate, UserUpdate } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { farmsWith } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { AppError, forbidden, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import type { EventBus } from '../../platform/events';
import type { Notifier } from '../notifications/notifier';
import { existingFarmIds, existingFarmNames } from '../farms/farms.repository';
import {
  findUserByEmail,
  findUserById,
  insertUser,
  listUsersOfFarms,
  membershipsOf,
  replaceMemberships,
  updateUser,
} from './users.repository';

export interface UsersService {
  list(ctx: RequestContext): Promise<User[]>;
  create(ctx: RequestContext, input: UserCreate): Promise<User>;
  update(ctx: RequestContext, id: number, input: UserUpdate): Promise<User>;
}

/**
 * Admins manage the users of the farms they administer, and only their roles on those farms. What belongs
 * to the whole account (name, disabled) changes only for an admin of every farm the person is on: an
 * admin of one farm takes a shared person off their farm by removing that farm's role (ADR 0004).
 */
export function createUsersService(
  db: Database,
  notifier: Notifier,
  events: EventBus,
): UsersService {
  function adminFarms(ctx: RequestContext): number[] {
    const farms = farmsWith(ctx, 'users.manage');
    if (farms.length === 0) throw forbidden('Only administrators manage users');
    return farms;
  }

  async function visibleUser(ctx: RequestContext, id: number): Promise<User> {
    const list = await listUsersOfFarms(db, adminFarms(ctx));
    const found = list.find((u) => u.id === id);
    if (!found) throw notFound('User');
    return toUser(found);
  }

  function checkMembershipFarms(ctx: RequestContext, farmIds: number[]): void {
    const allowed = new Set(adminFarms(ctx));
    const outside = farmIds.filter((id) => !allowed.has(id));
    if (outside.length > 0) {
      throw new AppError('validation_failed', 'You can only give roles on farms you administer', [
        { path: 'memberships', message: `Not an administrator of farm ${outside.join(', ')}` },
      ]);
    }
  }

  return {
    async list(ctx) {
      return (await listUsersOfFarms(db, adminFarms(ctx))).map(toUser);
    },

    async create(ctx, input) {
      adminFarms(ctx);
      checkMembershipFarms(
        ctx,
        input.memberships.map((m) => m.farmId),
      );
      if (await findUserByEmail(db, input.email)) {
        throw new AppError('conflict', 'A user with that e-mail already exists', [
          { path: 'email', message: 'Already in use' },
        ]);
      }
      // Without a password the user is invited: until they follow the link, no password opens the account.
      const passwordHash = await hash(input.password ?? randomBytes(32).toString('hex'));
      const id = await db.transaction(async (tx) => {
        const user = await insertUser(tx, { email: input.email, name: input.name, passwordHash });
        await replaceMemberships(tx, user.id, [], input.memberships);
        for (const m of input.memberships) {
          await recordAudit(tx, {
            farmId: m.farmId,
            actorUserId: ctx.user.id,
            action: 'user.create',
            entity: 'user',
            entityId: user.id,
            after: { email: user.email, name: user.name, role: m.role },
          });
        }
        return user.id;
      });
      const created = await visibleUser(ctx, id);
      if (input.password === undefined) {
        const farmNames = await existingFarmNames(
          db,
          input.memberships.map((m) => m.farmId),
        );
        await notifier.invite({ userId: id, invitedBy: ctx.user.name, farmNames });
      }
      return created;
    },

    async update(ctx, id, input) {
      const before = await visibleUser(ctx, id);
      if (id === ctx.user.id && input.disabled === true) {
        throw new AppError('validation_failed', 'You cannot disable your own account', [
          { path: 'disabled', message: 'Ask another administrator' },
        ]);
      }
      const managed = adminFarms(ctx);
      if (input.name !== undefined || input.disabled !== undefined) {
        const everyFarm = (await findUserById(db, id)) ? await membershipsOf(db, id) : [];
        const outside = everyFarm.filter((m) => !managed.includes(m.farmId));
        if (outside.length > 0) {
          throw forbidden(
            'This person also works on farms you do not administer: only an administrator of ' +
              'all their farms can rename or disable the account. Remove their role on your farms instead.',
          );
        }
      }
      if (input.memberships) {
        checkMembershipFarms(
          ctx,
          input.memberships.map((m) => m.farmId),
        );
        const known = await existingFarmIds(
          db,
          input.memberships.map((m) => m.farmId),
        );
        if (known.length !== input.memberships.length) throw notFound('Farm');
      }
      await db.transaction(async (tx) => {
        if (!(await findUserById(tx, id))) throw notFound('User');
        if (input.name !== undefined || input.disabled !== undefined) {
          await updateUser(tx, id, {
            ...(input.name !== undefined ? { name: input.name } : {}),
            ...(input.disabled !== undefined ? { disabled: input.disabled } : {}),
          });
        }
        if (input.memberships) await replaceMemberships(tx, id, managed, input.memberships);
        await recordAudit(tx, {
          farmId: before.memberships[0]?.farmId ?? null,
          actorUserId: ctx.user.id,
          action: 'user.update',
          entity: 'user',
          entityId: id,
          before,
          after: input,
        });
      });
      if (input.disabled === true && !before.disabled) {
        events.emit('user.access-changed', { userId: id, reason: 'disabled' });
      } else if (input.memberships) {
        events.emit('user.access-changed', { userId: id, reason: 'roles' });
      }
      const list = await listUsersOfFarms(db, managed);
      const after = list.find((u) => u.id === id);
      // A user whose last role on the admin's farms was removed is no longer theirs to see.
      return after ? toUser(after) : { ...before, memberships: [] };
    },
  };
}

function toUser(row: Awaited<ReturnType<typeof listUsersOfFarms>>[number]): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    disabled: row.disabled,
    memberships: row.memberships,
    createdAt: row.createdAt.toISOString(),
  };
}
