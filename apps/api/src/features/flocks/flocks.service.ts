import type {
  Flock,
  FlockCreate,
  FlockProduction,
  FlockUpdate,
  MortalityEntry,
} from '@tierscope/contracts';
import { flockCreateSchema } from '@tierscope/contracts';
import type { EventBus } from '../../platform/events';
import type { Database } from '@tierscope/db';
import {
  addDays,
  ageInWeeks,
  calendarDayOf,
  compartmentalLay,
  cumulativeMortalityPct,
  eggsPerHenHoused,
  henDayProductionPct,
  henHousedProductionPct,
  hensAliveByDay,
  isFitGoodEnough,
  livabilityPct,
  productionDayOf,
  eggsLaid,
} from '@tierscope/domain';
import { requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { AppError, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import { findHouse, type HouseRow } from '../houses/houses.repository';
import {
  activeFlock,
  findFlock,
  flocksOfHouse,
  houseDays,
  insertFlock,
  lossesOf,
  setSectionBirds,
  updateFlock,
  upsertLoss,
  type FlockRow,
} from './flocks.repository';
import { fitLayCurve } from './lay-curve-fit';

const round1 = (v: number | null) => (v === null ? null : Math.round(v * 10) / 10);
const round2 = (v: number | null) => (v === null ? null : Math.round(v * 100) / 100);

export interface FlocksService {
  list(ctx: RequestContext, houseId: number): Promise<Flock[]>;
  place(ctx: RequestContext, houseId: number, input: FlockCreate): Promise<Flock>;
  update(ctx: RequestContext, id: number, input: FlockUpdate): Promise<Flock>;
  recordLoss(ctx: RequestContext, id: number, day: string, entry: MortalityEntry): Promise<Flock>;
  production(ctx: RequestContext, id: number): Promise<FlockProduction>;
}

export function createFlocksService(db: Database, events?: EventBus): FlocksService {
  // The lay curve fitted to a house's flock changes with its records: every process forgets its fits.
  const changed = (house: { id: number; farmId: number }) =>
    events?.emit('flock.changed', { farmId: house.farmId, houseId: house.id });
  async function houseFor(
    ctx: RequestContext,
    houseId: number,
    permission: 'farm.read' | 'flock.manage',
  ) {
    const house = await findHouse(db, houseId);
    if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
    requireFarmPermission(ctx, house.farmId, permission, 'House');
    return house;
  }

  async function flockFor(
    ctx: RequestContext,
    id: number,
    permission: 'farm.read' | 'flock.manage',
  ) {
    const flock = await findFlock(db, id);
    if (!flock) throw notFound('Flock');
    const house = await findHouse(db, flock.houseId);
    if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('Flock');
    requireFarmPermission(ctx, house.farmId, permission, 'Flock');
    return { flock, house };
  }

  async function toFlock(flock: FlockRow): Promise<Flock> {
    return toFlockWith(flock, await lossesOf(db, flock.id));
  }

  function checkDay(flock: FlockRow, house: HouseRow, day: string): void {
    // Up to today's date on the house's own clock: the morning walk is entered for the day it is made.
    const latest = flock.endedOn ?? calendarDayOf(new Date(), house.timezone);
    if (day < flock.placedOn || day > latest) {
      throw new AppError('validation_failed', 'That day is not in the flock’s time in the house', [
        { path: 'date', message: `Between ${flock.placedOn} and ${latest}` },
      ]);
    }
  }

  return {
    async list(ctx, houseId) {
      await houseFor(ctx, houseId, 'farm.read');
      return Promise.all((await flocksOfHouse(db, houseId)).map((f) => toFlock(f)));
    },

    async place(ctx, houseId, raw) {
      const house = await houseFor(ctx, houseId, 'flock.manage');
      const input = flockCreateSchema.parse(raw);
      if (await activeFlock(db, houseId)) {
        throw new AppError(
          'conflict',
          `${house.name} already has a flock: end it before placing the next`,
        );
      }
      const outside = (input.birdsPerSection ?? []).filter(
        (b) => b.row > house.rows || b.tier > house.tiers,
      );
      if (outside.length > 0) {
        throw new AppError('validation_failed', 'A section is not in the house', [
          {
            path: 'birdsPerSection',
            message: `${house.name} has rows 1–${house.rows} and tiers 1–${house.tiers}`,
          },
        ]);
      }
      const flock = await db.transaction(async (tx) => {
        const created = await insertFlock(tx, {
          houseId,
          placedOn: input.placedOn,
          hensHoused: input.hensHoused,
          ageAtPlacementWeeks: input.ageAtPlacementWeeks,
          breed: input.breed,
        });
        await setSectionBirds(tx, houseId, input.birdsPerSection ?? null);
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: ctx.user.id,
          action: 'flock.place',
          entity: 'flock',
          entityId: created.id,
          after: input,
        });
        return created;
      });
      changed(house);
      return toFlock(flock);
    },

    async update(ctx, id, input) {
      const { flock, house } = await flockFor(ctx, id, 'flock.manage');
      if (input.endedOn && input.endedOn < flock.placedOn) {
        throw new AppError('validation_failed', 'A flock cannot end before it was placed', [
          { path: 'endedOn', message: `On or after ${flock.placedOn}` },
        ]);
      }
      const updated = await db.transaction(async (tx) => {
        const row = await updateFlock(tx, id, input);
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: ctx.user.id,
          action: input.endedOn ? 'flock.end' : 'flock.update',
          entity: 'flock',
          entityId: id,
          before: flock,
          after: input,
        });
        return row;
      });
      if (!updated) throw notFound('Flock');
      changed(house);
      return toFlock(updated);
    },

    async recordLoss(ctx, id, day, entry) {
      const { flock, house } = await flockFor(ctx, id, 'flock.manage');
      checkDay(flock, house, day);
      await db.transaction(async (tx) => {
        await upsertLoss(tx, id, day, entry);
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: ctx.user.id,
          action: 'flock.mortality',
          entity: 'flock',
          entityId: id,
          after: { day, ...entry },
        });
      });
      changed(house);
      return toFlock(flock);
    },

    async production(ctx, id) {
      const { flock, house } = await flockFor(ctx, id, 'farm.read');
      return computeProduction(db, flock, house);
    },
  };
}

/** A flock's production by day and week of age, its figures and its fitted lay curve (no access check). */
export async function computeProduction(
  db: Database,
  flock: FlockRow,
  house: HouseRow,
  /** fit the curve only on weeks that end before this day (an expectation must not learn the dip it judges) */
  fitBefore?: string,
): Promise<FlockProduction> {
  const today = (h: HouseRow) => productionDayOf(new Date(), h.timezone, h.lightsOn);
  const id = flock.id;
  // Complete production days only: today's is still being laid.
  const lastDay = flock.endedOn ?? addDays(today(house), -1);
  const losses = await lossesOf(db, id);
  const lossByDay = new Map(losses.map((l) => [l.date, l]));
  const alive = hensAliveByDay(flock, losses, flock.placedOn, lastDay);
  const eggs = await houseDays(db, house.id, flock.placedOn, lastDay);
  const days: FlockProduction['days'] = [];
  for (const [day, hens] of alive) {
    const counted = eggs.get(day);
    const dayEggs =
      counted && (counted.belts !== null || counted.collector !== null)
        ? eggsLaid(counted.belts ?? 0, counted.collector)
        : null;
    const loss = lossByDay.get(day);
    days.push({
      day,
      ageWeeks: ageInWeeks(flock.placedOn, flock.ageAtPlacementWeeks, day),
      eggs: dayEggs,
      collector: counted?.collector ?? null,
      hensAlive: hens,
      dead: loss?.dead ?? 0,
      culled: loss?.culled ?? 0,
      henDayPct: dayEggs === null ? null : round1(henDayProductionPct(dayEggs, hens)),
      isWalkRecorded: loss !== undefined,
    });
  }
  const byWeek = new Map<number, typeof days>();
  for (const d of days) byWeek.set(d.ageWeeks, [...(byWeek.get(d.ageWeeks) ?? []), d]);
  const weekly = [...byWeek.entries()].map(([ageWeeks, list]) => {
    const counted = list.filter((d) => d.eggs !== null);
    const weekEggs = counted.reduce((s, d) => s + (d.eggs ?? 0), 0);
    const henDaysTotal = counted.reduce((s, d) => s + d.hensAlive, 0);
    const dead = list.reduce((s, d) => s + d.dead, 0);
    const culled = list.reduce((s, d) => s + d.culled, 0);
    const startHens = list[0]?.hensAlive ?? 0;
    return {
      ageWeeks,
      firstDay: list[0]?.day ?? '',
      days: counted.length,
      eggs: weekEggs,
      henDays: henDaysTotal,
      henDayPct: round1(henDayProductionPct(weekEggs, henDaysTotal)),
      dead,
      culled,
      mortalityPct: startHens > 0 ? round2((100 * (dead + culled)) / startHens) : null,
      fittedPct: null as number | null,
    };
  });
  // Fit on weeks with at least 5 counted days, so a half week does not pull the curve.
  const fit = fitLayCurve(
    weekly
      .filter(
        (w) =>
          w.days >= 5 &&
          w.henDayPct !== null &&
          (fitBefore === undefined || addDays(w.firstDay, 7) <= fitBefore),
      )
      .map((w) => ({ ageWeeks: w.ageWeeks, pct: w.henDayPct ?? 0 })),
  );
  if (fit) for (const w of weekly) w.fittedPct = round1(compartmentalLay(w.ageWeeks, fit.params));
  const counted = days.filter((d) => d.eggs !== null);
  const totalEggs = counted.reduce((s, d) => s + (d.eggs ?? 0), 0);
  const henDaysAll = counted.reduce((s, d) => s + d.hensAlive, 0);
  const lost = losses.reduce((s, l) => s + l.dead + l.culled, 0);
  return {
    flock: toFlockWith(flock, losses),
    houseName: house.name,
    timezone: house.timezone,
    days,
    weeks: weekly,
    totals: {
      eggs: totalEggs,
      days: counted.length,
      henDayPct: round1(henDayProductionPct(totalEggs, henDaysAll)),
      henHousedPct: round1(henHousedProductionPct(totalEggs, flock.hensHoused, counted.length)),
      eggsPerHenHoused: round1(eggsPerHenHoused(totalEggs, flock.hensHoused)),
      cumulativeMortalityPct: round2(cumulativeMortalityPct(lost, flock.hensHoused)),
      livabilityPct: round2(livabilityPct(lost, flock.hensHoused)),
    },
    fit: fit
      ? {
          model: 'compartmental' as const,
          params: fit.params,
          r2: fit.r2 === null ? null : Math.round(fit.r2 * 1000) / 1000,
          weeks: fit.weeks,
          isGoodEnough: isFitGoodEnough(fit),
        }
      : null,
  };
}

function toFlockWith(flock: FlockRow, losses: { dead: number; culled: number }[]): Flock {
  const lost = losses.reduce((s, l) => s + l.dead + l.culled, 0);
  return {
    id: flock.id,
    houseId: flock.houseId,
    placedOn: flock.placedOn,
    hensHoused: flock.hensHoused,
    ageAtPlacementWeeks: flock.ageAtPlacementWeeks,
    breed: flock.breed,
    endedOn: flock.endedOn,
    hensAlive: Math.max(0, flock.hensHoused - lost),
    lost,
  };
}
