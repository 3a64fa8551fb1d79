import type { Database } from '@tierscope/db';
import {
  addDays,
  CHECKPOINT_HOURS,
  dayHourRatios,
  daysOf,
  LAY_GRID_HOURS,
  findingKey,
  keepsDayOutOfBaseline,
  NORM_DAYS,
  pastDayOf,
  productionDayStart,
  sectionKey,
  type HistoryDay,
  type PastDay,
  type SectionCount,
  type SectionCounts,
} from '@tierscope/domain';
import type { EventBus } from '../../platform/events';
import { houseLayout, sectionDays, sectionStageCounts } from './evaluation.repository';
import { type ExceptionRow } from './exception-rows.repository';
import { exceptionsOverlapping } from './exception-rows.repository';

export type Layout = NonNullable<Awaited<ReturnType<typeof houseLayout>>>;

/** How long a house's layout and its past days' baseline may be reused between evaluations and frames. */
const CACHE_MS = 30_000;
/** What a house's read-mostly figures are kept for, by key, for CACHE_MS. */
type Cache<T> = Map<string, { at: number; value: Promise<T> }>;

/** A cached value while it is fresh, else loaded anew (a failed load is not kept). */
function remembered<T>(cache: Cache<T>, key: string, load: () => Promise<T>): Promise<T> {
  const hit = cache.get(key);
  if (hit && Date.now() - hit.at < CACHE_MS) return hit.value;
  const value = load();
  cache.set(key, { at: Date.now(), value });
  value.catch(() => cache.delete(key));
  return value;
}

/** Keys of the sections an exception covers, for keeping its days out of the baseline. */
export function coveredSections(e: ExceptionRow, layout: Layout): string[] {
  return layout.sections
    .filter((s) =>
      e.scope === 'section'
        ? s.row === e.row && s.tier === e.tier
        : e.scope === 'row'
          ? s.row === e.row
          : e.scope === 'tier'
            ? s.tier === e.tier
            : false,
    )
    .map((s) => sectionKey(s.row, s.tier));
}

/** A house's sections with counts, as the judgement reads them. */
export function counts(layout: Layout, eggsBySection: Map<number, number>): SectionCount[] {
  return layout.sections
    .filter((s) => eggsBySection.has(s.id))
    .map((s) => ({
      row: s.row,
      tier: s.tier,
      eggs: eggsBySection.get(s.id) ?? 0,
      birds: s.birds,
    }));
}

/**
 * What the engine and the map read of a house's past, shared by both and cached briefly: its layout, the last
 * seven days by section (the map's yardstick) and the complete past days by checkpoint (the judgement's), with
 * the days a spot had a fault kept out. The caches are cleared by the cluster's events on every process.
 */
export interface HouseBaseline {
  layout(houseId: number): Promise<Layout | undefined>;
  /** The seven days before `beforeDay` by section, with each day's faulty spots kept out. */
  history(layout: Layout, beforeDay: string): Promise<HistoryDay[]>;
  /** The complete past days before `beforeDay` by checkpoint, with each day's faulty spots kept out. */
  pastDays(layout: Layout, beforeDay: string): Promise<PastDay[]>;
}

export function createHouseBaseline(db: Database, events: EventBus): HouseBaseline {
  // The seven days before today do not change while today runs, so frames and evaluations share them. They
  // are dropped when readings for past days arrive or an exception changes (exceptions shape the baseline).
  const historyCache: Cache<HistoryDay[]> = new Map();
  const layoutCache: Cache<Layout | undefined> = new Map();
  const pastCache: Cache<PastDay[]> = new Map();
  const forget = (houseId: number) => {
    for (const key of historyCache.keys())
      if (key.startsWith(`${houseId}|`)) historyCache.delete(key);
    for (const key of pastCache.keys()) if (key.startsWith(`${houseId}|`)) pastCache.delete(key);
  };
  events.on('readings.accepted', (e) => {
    if (e.firstTs.getTime() < Date.now() - 20 * 3_600_000) forget(e.houseId);
  });
  events.on('house.evaluated', (e) => {
    if (e.changed.length > 0) forget(e.houseId);
  });
  events.on('exception.changed', (e) => {
    forget(e.houseId);
  });

  function layout(houseId: number): Promise<Layout | undefined> {
    return remembered(layoutCache, String(houseId), () => houseLayout(db, houseId));
  }

  function history(layout: Layout, beforeDay: string): Promise<HistoryDay[]> {
    return remembered(historyCache, `${layout.house.id}|${beforeDay}`, () =>
      loadHistory(layout, beforeDay),
    );
  }

  async function loadHistory(layout: Layout, beforeDay: string): Promise<HistoryDay[]> {
    const { house } = layout;
    const firstDay = addDays(beforeDay, -7);
    const lastDay = addDays(beforeDay, -1);
    const rows = await sectionDays(
      db,
      house.farmId,
      layout.sections.map((s) => s.id),
      firstDay,
      lastDay,
    );
    const byId = new Map(layout.sections.map((s) => [s.id, s]));
    const overlapping = await exceptionsOverlapping(
      db,
      house.id,
      productionDayStart(firstDay, house.timezone, house.lightsOn),
      productionDayStart(beforeDay, house.timezone, house.lightsOn),
    );
    return daysOf({ firstDay, lastDay }).map((day) => {
      const dayStart = productionDayStart(day, house.timezone, house.lightsOn);
      const dayEnd = productionDayStart(addDays(day, 1), house.timezone, house.lightsOn);
      const excluded = new Set<string>();
      for (const e of overlapping) {
        // A spot closed as "normal for this spot" lets its days into the baseline.
        if (keepsDayOutOfBaseline(e, dayStart, dayEnd)) {
          for (const key of coveredSections(e, layout)) excluded.add(key);
        }
      }
      const sections: SectionCount[] = rows
        .filter((r) => r.day === day)
        .flatMap((r) => {
          const s = byId.get(r.section_id);
          return s ? [{ row: s.row, tier: s.tier, eggs: r.eggs, birds: s.birds }] : [];
        });
      return { day, sections, excluded };
    });
  }

  /**
   * A house's complete past days as the judgement needs them: each spot's log ratio by checkpoint and for
   * the whole day, with the spots that had an exception that day kept out (a fault is never learned as
   * normal; a spot closed as normal for this spot lets its days in). Cached like the old baseline.
   */
  function pastDays(layout: Layout, beforeDay: string): Promise<PastDay[]> {
    return remembered(pastCache, `${layout.house.id}|${beforeDay}`, () =>
      loadPastDays(layout, beforeDay),
    );
  }

  async function loadPastDays(layout: Layout, beforeDay: string): Promise<PastDay[]> {
    const { house } = layout;
    const firstDay = addDays(beforeDay, -NORM_DAYS);
    const lastDay = addDays(beforeDay, -1);
    // The checkpoints and, for the silent-counter check, each grid hour of the first hours of light.
    const hours = [...CHECKPOINT_HOURS, ...LAY_GRID_HOURS];
    const rows = await sectionStageCounts(db, house, hours, firstDay, lastDay);
    const overlapping = await exceptionsOverlapping(
      db,
      house.id,
      productionDayStart(firstDay, house.timezone, house.lightsOn),
      productionDayStart(beforeDay, house.timezone, house.lightsOn),
    );
    const byId = new Map(layout.sections.map((sec) => [sec.id, sec]));
    const days: PastDay[] = [];
    for (let day = lastDay; day >= firstDay; day = addDays(day, -1)) {
      const dayStart = productionDayStart(day, house.timezone, house.lightsOn);
      const dayEnd = productionDayStart(addDays(day, 1), house.timezone, house.lightsOn);
      const excluded = new Set<string>();
      for (const e of overlapping) {
        if (keepsDayOutOfBaseline(e, dayStart, dayEnd)) excluded.add(findingKey(e));
      }
      const sections = rows
        .filter((r) => r.day === day)
        .flatMap((r) => {
          const sec = byId.get(r.sectionId);
          return sec ? [{ sec, byStage: r.byStage }] : [];
        });
      const counts: SectionCounts[] = sections.map(({ sec, byStage }) => ({
        row: sec.row,
        tier: sec.tier,
        byStage: [...byStage.slice(0, CHECKPOINT_HOURS.length), byStage[hours.length] ?? 0],
      }));
      const hourRatios = dayHourRatios(
        sections.map(({ sec, byStage }) => ({
          row: sec.row,
          tier: sec.tier,
          byHour: byStage.slice(CHECKPOINT_HOURS.length, hours.length),
        })),
      );
      if (counts.length > 0) days.push(pastDayOf(day, counts, excluded, new Map(), hourRatios));
    }
    return days;
  }

  return { layout, history, pastDays };
}
