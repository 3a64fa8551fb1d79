import type { CounterPlaced, CounterPlacement, UnknownCounter } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { AppError, notFound } from '../../platform/errors';
import type { EventBus } from '../../platform/events';
import { recordAudit } from '../audit/audit.repository';
import { countersOfHouse, findHouse } from '../houses/houses.repository';
import { rollUpHeldReadings } from '../ingest/ingest.repository';
import {
  counterHasReadings,
  countersAtPlace,
  deleteCounterAndReadings,
  findCounter,
  findSection,
  listUnknownCounters,
  lockCounter,
  placeCounter,
  productionDaysOf,
  readingsBetween,
  retireCounter,
  type CounterRow,
} from './counters.repository';

export interface CountersService {
  unknown(ctx: RequestContext, farmId: number): Promise<UnknownCounter[]>;
  place(ctx: RequestContext, counterId: number, input: CounterPlacement): Promise<CounterPlaced>;
  forget(ctx: RequestContext, counterId: number): Promise<void>;
}

const alreadyPlaced = (counter: CounterRow) =>
  new AppError('conflict', `Counter ${counter.externalId} already has a place`);

/**
 * The integrator's side of counters: ids a gateway sent that no house has yet are held with their readings
 * until placed on a belt or a collector (then counted there, the days they touch judged again) or forgotten.
 */
export function createCountersService(db: Database, events?: EventBus): CountersService {
  /** An unknown counter of a farm the caller may manage counters on; any other is "not found". */
  async function unknownCounterFor(ctx: RequestContext, counterId: number) {
    const counter = await findCounter(db, counterId);
    if (!counter || !ctx.user.roles.has(counter.farmId)) throw notFound('Counter');
    requireFarmPermission(ctx, counter.farmId, 'counters.manage', 'Counter');
    if (counter.houseId !== null) throw alreadyPlaced(counter);
    return counter;
  }

  return {
    async unknown(ctx, farmId) {
      requireFarmPermission(ctx, farmId, 'counters.manage');
      return (await listUnknownCounters(db, farmId)).map((c) => ({
        id: c.id,
        externalId: c.externalId,
        firstSeenAt: c.createdAt.toISOString(),
        readings: c.readings,
        eggs: c.eggs,
        firstReadingAt: c.firstTs?.toISOString() ?? null,
        lastReadingAt: c.lastTs?.toISOString() ?? null,
      }));
    },

    async place(ctx, counterId, input) {
      const counter = await unknownCounterFor(ctx, counterId);
      const house = await findHouse(db, input.houseId);
      if (house?.farmId !== counter.farmId) throw notFound('House');
      const isBelt = input.kind === 'belt';
      if (isBelt) {
        const fields = [];
        if ((input.row ?? 0) > house.rows)
          fields.push({ path: 'row', message: `${house.name} has rows 1 to ${house.rows}` });
        if ((input.tier ?? 0) > house.tiers)
          fields.push({ path: 'tier', message: `${house.name} has tiers 1 to ${house.tiers}` });
        if (fields.length > 0)
          throw new AppError('validation_failed', 'That place is not in the house', fields);
      }
      const placeName = isBelt
        ? `${house.name}, row ${input.row}, tier ${input.tier}`
        : `${house.name}'s collector`;

      const outcome = await db.transaction(async (tx) => {
        const locked = await lockCounter(tx, counterId);
        if (!locked) throw notFound('Counter');
        if (locked.houseId !== null) throw alreadyPlaced(locked);
        let sectionId: number | null = null;
        if (isBelt) {
          const section = await findSection(tx, house.id, input.row ?? 0, input.tier ?? 0);
          if (!section) throw notFound('Section');
          sectionId = section.id;
        }
        const held = (await listUnknownCounters(tx, counter.farmId, counterId))[0];
        // The counter that has the place now: an unused default gives way, one with readings is retired
        // (its days stay its section's) unless it counted during the held hours: two counters on one belt
        // at once would count its eggs twice.
        let replaced: CounterRow | null = null;
        for (const current of await countersAtPlace(tx, house.id, sectionId)) {
          if (!(await counterHasReadings(tx, counter.farmId, current.id))) {
            await deleteCounterAndReadings(tx, counter.farmId, current.id);
            continue;
          }
          if (
            held?.firstTs &&
            held.lastTs &&
            (await readingsBetween(tx, counter.farmId, current.id, held.firstTs, held.lastTs)) > 0
          ) {
            throw new AppError(
              'conflict',
              `Counter ${current.externalId} at ${placeName} counted during the same hours as ${counter.externalId}: ` +
                'both cannot be counting one belt. Choose another place, or check which id the gateway sends for it.',
            );
          }
          await retireCounter(tx, current.id);
          replaced = current;
        }
        const placed = await placeCounter(tx, counterId, {
          houseId: house.id,
          sectionId,
          kind: input.kind,
        });
        if (!placed) throw alreadyPlaced(counter);
        await rollUpHeldReadings(tx, counter.farmId, [counterId]);
        await recordAudit(tx, {
          farmId: counter.farmId,
          actorUserId: ctx.user.id,
          action: 'counter.place',
          entity: 'counter',
          entityId: counterId,
          before: { houseId: null },
          after: {
            houseId: house.id,
            kind: input.kind,
            row: input.row ?? null,
            tier: input.tier ?? null,
            replaced: replaced?.externalId ?? null,
            readings: held?.readings ?? 0,
          },
        });
        const days = await productionDaysOf(tx, counter.farmId, counterId, house.id);
        return { held, replaced, days };
      });

      const { held, replaced, days } = outcome;
      if (held?.firstTs && held.lastTs && held.readings > 0) {
        events?.emit('readings.accepted', {
          farmId: counter.farmId,
          houseId: house.id,
          readingsAdded: held.readings,
          eggsAdded: held.eggs,
          firstTs: held.firstTs,
          lastTs: held.lastTs,
          replayAllDays: true,
        });
      }
      const view = (await countersOfHouse(db, house.id)).find((c) => c.id === counterId);
      if (!view) throw notFound('Counter');
      return {
        counter: view,
        houseId: house.id,
        replacedExternalId: replaced?.externalId ?? null,
        readings: held?.readings ?? 0,
        eggs: held?.eggs ?? 0,
        firstDay: days.firstDay,
        lastDay: days.lastDay,
      };
    },

    async forget(ctx, counterId) {
      const counter = await unknownCounterFor(ctx, counterId);
      await db.transaction(async (tx) => {
        const locked = await lockCounter(tx, counterId);
        if (!locked) throw notFound('Counter');
        if (locked.houseId !== null) throw alreadyPlaced(locked);
        const held = (await listUnknownCounters(tx, counter.farmId, counterId))[0];
        await deleteCounterAndReadings(tx, counter.farmId, counterId);
        await recordAudit(tx, {
          farmId: counter.farmId,
          actorUserId: ctx.user.id,
          action: 'counter.forget',
          entity: 'counter',
          entityId: counterId,
          before: {
            externalId: counter.externalId,
            readings: held?.readings ?? 0,
            eggs: held?.eggs ?? 0,
          },
        });
      });
    },
  };
}
