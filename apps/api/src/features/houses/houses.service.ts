import type {
  Counter,
  House,
  HouseCreate,
  HouseUpdate,
  HouseWithCounters,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { AppError, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import {
  countersOfHouse,
  createHouse,
  deleteHouse,
  findHouse,
  houseHasReadings,
  houseNameTaken,
  listHousesOfFarm,
  relayOutHouse,
  updateHouse,
  type HouseRow,
} from './houses.repository';

export interface HousesService {
  listByFarm(ctx: RequestContext, farmId: number): Promise<House[]>;
  get(ctx: RequestContext, houseId: number): Promise<HouseWithCounters>;
  counters(ctx: RequestContext, houseId: number): Promise<Counter[]>;
  create(
    ctx: RequestContext,
    farmId: number,
    input: Required<HouseCreate>,
  ): Promise<HouseWithCounters>;
  update(ctx: RequestContext, houseId: number, input: HouseUpdate): Promise<HouseWithCounters>;
  remove(ctx: RequestContext, houseId: number): Promise<void>;
}

const nameTaken = () =>
  new AppError('conflict', 'This farm already has a house with that name', [
    { path: 'name', message: 'Already used on this farm' },
  ]);

export function createHousesService(db: Database): HousesService {
  /** Loads a house and checks the caller's role on its farm; a house of another farm is "not found". */
  async function houseFor(
    ctx: RequestContext,
    houseId: number,
    permission: Parameters<typeof requireFarmPermission>[2],
  ) {
    const house = await findHouse(db, houseId);
    if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
    requireFarmPermission(ctx, house.farmId, permission, 'House');
    return house;
  }

  async function withCounters(house: HouseRow): Promise<HouseWithCounters> {
    return { ...toHouse(house), counters: await countersOfHouse(db, house.id) };
  }

  return {
    async listByFarm(ctx, farmId) {
      requireFarmPermission(ctx, farmId, 'farm.read');
      return (await listHousesOfFarm(db, farmId)).map(toHouse);
    },

    async get(ctx, houseId) {
      return withCounters(await houseFor(ctx, houseId, 'farm.read'));
    },

    async counters(ctx, houseId) {
      const house = await houseFor(ctx, houseId, 'farm.read');
      return countersOfHouse(db, house.id);
    },

    async create(ctx, farmId, input) {
      requireFarmPermission(ctx, farmId, 'house.create');
      if (await houseNameTaken(db, farmId, input.name)) throw nameTaken();
      const house = await db.transaction(async (tx) => {
        const created = await createHouse(tx, farmId, input);
        await recordAudit(tx, {
          farmId,
          actorUserId: ctx.user.id,
          action: 'house.create',
          entity: 'house',
          entityId: created.id,
          after: created,
        });
        return created;
      });
      return withCounters(house);
    },

    async update(ctx, houseId, input) {
      const before = await houseFor(ctx, houseId, 'house.update');
      if (
        input.name !== undefined &&
        (await houseNameTaken(db, before.farmId, input.name, houseId))
      ) {
        throw nameTaken();
      }
      const isLayoutChange =
        (input.rows !== undefined && input.rows !== before.rows) ||
        (input.tiers !== undefined && input.tiers !== before.tiers);
      const updated = await db.transaction(async (tx) => {
        if (isLayoutChange && (await houseHasReadings(tx, houseId))) {
          throw new AppError(
            'conflict',
            'Rows and tiers cannot change once the house has counted eggs',
            [
              {
                path: input.rows !== undefined ? 'rows' : 'tiers',
                message: 'The house already has readings',
              },
            ],
          );
        }
        const row = await updateHouse(tx, houseId, input);
        if (!row) throw notFound('House');
        if (isLayoutChange) await relayOutHouse(tx, row);
        await recordAudit(tx, {
          farmId: row.farmId,
          actorUserId: ctx.user.id,
          action: 'house.update',
          entity: 'house',
          entityId: houseId,
          before,
          after: row,
        });
        return row;
      });
      return withCounters(updated);
    },

    async remove(ctx, houseId) {
      const house = await houseFor(ctx, houseId, 'house.delete');
      await db.transaction(async (tx) => {
        if (await houseHasReadings(tx, houseId)) {
          throw new AppError(
            'conflict',
            'A house that has counted eggs keeps its history and cannot be deleted',
          );
        }
        await deleteHouse(tx, houseId);
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: ctx.user.id,
          action: 'house.delete',
          entity: 'house',
          entityId: houseId,
          before: house,
        });
      });
    },
  };
}

function toHouse(row: HouseRow): House {
  return {
    id: row.id,
    farmId: row.farmId,
    name: row.name,
    rows: row.rows,
    tiers: row.tiers,
    timezone: row.timezone,
    lightsOn: row.lightsOn,
    photoperiodHours: row.photoperiodHours,
    shortfallThresholdPct: row.shortfallThresholdPct,
    eggPricePerDozen: row.eggPricePerDozen,
    createdAt: row.createdAt.toISOString(),
  };
}
