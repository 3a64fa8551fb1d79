import type { Farm, FarmCreate, FarmUpdate } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { farmsWith, requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { forbidden, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import {
  addMembership,
  findFarm,
  insertFarm,
  listFarmsOfUser,
  updateFarm,
} from './farms.repository';

export interface FarmsService {
  list(ctx: RequestContext): Promise<Farm[]>;
  get(ctx: RequestContext, farmId: number): Promise<Farm>;
  create(ctx: RequestContext, input: Required<FarmCreate>): Promise<Farm>;
  update(ctx: RequestContext, farmId: number, input: FarmUpdate): Promise<Farm>;
}

export function createFarmsService(db: Database): FarmsService {
  async function read(ctx: RequestContext, farmId: number): Promise<Farm> {
    const role = requireFarmPermission(ctx, farmId, 'farm.read');
    const farm = await findFarm(db, farmId);
    if (!farm) throw notFound('Farm');
    return { ...farm, role, createdAt: farm.createdAt.toISOString() };
  }

  return {
    async list(ctx) {
      const rows = await listFarmsOfUser(db, ctx.user.id);
      return rows.map((r) => ({ ...r, createdAt: r.createdAt.toISOString() }));
    },

    get: read,

    /** An administrator of any farm of the company may add a farm, and administers it. */
    async create(ctx, input) {
      if (farmsWith(ctx, 'users.manage').length === 0) {
        throw forbidden('Only administrators add farms');
      }
      const farm = await db.transaction(async (tx) => {
        const created = await insertFarm(tx, input);
        await addMembership(tx, ctx.user.id, created.id, 'admin');
        await recordAudit(tx, {
          farmId: created.id,
          actorUserId: ctx.user.id,
          action: 'farm.create',
          entity: 'farm',
          entityId: created.id,
          after: created,
        });
        return created;
      });
      return {
        id: farm.id,
        name: farm.name,
        currency: farm.currency,
        role: 'admin',
        houseCount: 0,
        createdAt: farm.createdAt.toISOString(),
      };
    },

    async update(ctx, farmId, input) {
      requireFarmPermission(ctx, farmId, 'farm.update');
      const before = await read(ctx, farmId);
      await db.transaction(async (tx) => {
        await updateFarm(tx, farmId, input);
        await recordAudit(tx, {
          farmId,
          actorUserId: ctx.user.id,
          action: 'farm.update',
          entity: 'farm',
          entityId: farmId,
          before: Object.fromEntries(
            Object.keys(input).map((k) => [k, before[k as keyof FarmUpdate]]),
          ),
          after: input,
        });
      });
      return { ...before, ...input };
    },
  };
}
