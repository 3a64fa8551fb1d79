import type { CellDetail, HouseMap, LineJudgement } from '@tierscope/contracts';
import { housesJudgingPastDays } from '../../platform/cluster.repository';
import type { Database } from '@tierscope/db';
import {
  addDays,
  cellsAgainstShortTiers,
  judgeHouse,
  median,
  productionDayStart,
  productionWindow,
  sectionKey,
  type HouseJudgement,
  type ProductionWindow,
  eggsLaid,
} from '@tierscope/domain';
import {
  beltHorizons,
  collectorTotal,
  hensAlive,
  houseLayout,
  sectionHours,
  sectionTotals,
} from './evaluation.repository';
import { exceptionsOverlapping } from './exception-rows.repository';
import { counts, coveredSections, type HouseBaseline } from './house-baseline';

/** A section whose data is this far behind its house's newest is shown as late on the map. */
const DATA_LATE_MAP_MS = 30 * 60_000;

/** The two read models of a house's judgement: the rows × tiers map of a window, and one section's detail. */
export interface HouseMapReader {
  /** One section's day curve against its peers and its last 14 days against expected. */
  cellDetail(
    houseId: number,
    row: number,
    tier: number,
    now?: Date,
  ): Promise<Omit<CellDetail, 'exception' | 'silence' | 'likelyChecks'> | undefined>;
  /** The rows × tiers map of a window. */
  buildMap(
    houseId: number,
    window: ProductionWindow | 'today',
    now?: Date,
  ): Promise<HouseMap | undefined>;
}

/**
 * A house's cells, those of tiers under a tier exception measured against the tier's yardstick. Only the
 * engine's verdict counts: a tier that merely reads short (a silent counter in it, a partial day) keeps its
 * cells against their peers, or its healthy cells would look short.
 */
function withTierYardstick(
  judged: HouseJudgement,
  thresholdPct: number,
  tiersUnderException: ReadonlySet<number>,
) {
  return cellsAgainstShortTiers(
    judged.cells,
    judged.candidates
      .filter((c) => c.scope === 'tier' && c.tier !== null && tiersUnderException.has(c.tier))
      .map((c) => ({ tier: c.tier ?? 0, eggs: c.eggs, expected: c.expected })),
    thresholdPct,
  );
}

export function createHouseMap(db: Database, baseline: HouseBaseline): HouseMapReader {
  return {
    async cellDetail(houseId, row, tier, now = new Date()) {
      const layout = await houseLayout(db, houseId);
      const section = layout?.sections.find((s) => s.row === row && s.tier === tier);
      if (!layout || !section) return undefined;
      const { house } = layout;
      const today = productionWindow('today', now, house);
      const hoursToday = await sectionHours(db, house.farmId, house.id, today.from, today.to);
      const peers = layout.sections
        .filter((s) => s.tier === tier && s.row !== row)
        .map((s) => s.id);
      const cumulative = new Map<number, number>();
      const points: CellDetail['today'] = [];
      for (const hour of [...new Set(hoursToday.map((h) => h.hour.getTime()))].sort(
        (a, b) => a - b,
      )) {
        for (const h of hoursToday.filter((x) => x.hour.getTime() === hour))
          cumulative.set(h.sectionId, (cumulative.get(h.sectionId) ?? 0) + h.eggs);
        const peerValues = peers.map((id) => cumulative.get(id) ?? 0);
        points.push({
          hour: new Date(hour).toISOString(),
          eggs: cumulative.get(section.id) ?? 0,
          peers: peerValues.length ? median(peerValues) : null,
        });
      }
      const days: CellDetail['days'] = [];
      const firstDay = addDays(today.firstDay, -14);
      const tierFaults = (
        await exceptionsOverlapping(
          db,
          house.id,
          productionDayStart(firstDay, house.timezone, house.lightsOn),
          today.from,
        )
      ).filter((e) => e.kind === 'shortfall' && e.scope === 'tier' && e.tier !== null);
      for (let back = 14; back >= 1; back--) {
        const day = addDays(today.firstDay, -back);
        const dayStart = productionDayStart(day, house.timezone, house.lightsOn);
        const dayEnd = productionDayStart(addDays(day, 1), house.timezone, house.lightsOn);
        const tiersUnderException = new Set(
          tierFaults
            .filter((e) => e.openedAt < dayEnd && (e.closedAt === null || e.closedAt > dayStart))
            .map((e) => e.tier ?? 0),
        );
        const totals = await sectionTotals(
          db,
          house.farmId,
          layout.sections.map((s) => s.id),
          day,
          day,
        );
        const judged = judgeHouse({
          rows: house.rows,
          tiers: house.tiers,
          thresholdPct: house.shortfallThresholdPct,
          current: counts(layout, totals),
          history: await baseline.history(layout, day),
        });
        const cell = withTierYardstick(
          judged,
          house.shortfallThresholdPct,
          tiersUnderException,
        ).find((c) => c.row === row && c.tier === tier);
        days.push({ day, eggs: cell?.eggs ?? null, expected: cell?.expected ?? null });
      }
      return { row, tier, timezone: house.timezone, today: points, days };
    },

    async buildMap(houseId, windowOrToday, now = new Date()) {
      const layout = await baseline.layout(houseId);
      if (!layout) return undefined;
      const { house } = layout;
      const window =
        windowOrToday === 'today' ? productionWindow('today', now, house) : windowOrToday;
      const totals = await sectionTotals(
        db,
        house.farmId,
        layout.sections.map((s) => s.id),
        window.firstDay,
        window.lastDay,
      );
      const current = counts(layout, totals);
      const judged = judgeHouse({
        rows: house.rows,
        tiers: house.tiers,
        thresholdPct: house.shortfallThresholdPct,
        current,
        history: await baseline.history(layout, window.firstDay),
      });
      const inWindow = await exceptionsOverlapping(db, house.id, window.from, window.to);
      const overlapping = inWindow.filter(
        (e) => e.kind !== 'collector_gap' && e.kind !== 'house_dip',
      );
      const kindRank: Record<string, number> = { silent_counter: 0, shortfall: 1 };
      // Today: each section's data horizon, and whether it is well behind the house's newest.
      const horizons =
        window.kind === 'today'
          ? await beltHorizons(db, house.farmId, house.id, window.from)
          : new Map<number, Date>();
      const newest = Math.max(0, ...[...horizons.values()].map((d) => d.getTime()));
      const sectionIdOf = new Map(layout.sections.map((s) => [sectionKey(s.row, s.tier), s.id]));
      // Rows and tiers as the engine judged them, each with the exception that covers it in the window.
      const lines = (scope: 'row' | 'tier'): LineJudgement[] =>
        judged.candidates
          .filter((c) => c.scope === scope)
          .map((c) => {
            const at = (scope === 'row' ? c.row : c.tier) ?? 0;
            const covering = inWindow
              .filter(
                (e) =>
                  e.kind === 'shortfall' &&
                  e.scope === scope &&
                  (scope === 'row' ? e.row : e.tier) === at &&
                  (window.kind !== 'today' || e.status !== 'closed'),
              )
              .sort((a, b) => (a.status === 'closed' ? 1 : 0) - (b.status === 'closed' ? 1 : 0));
            return {
              at,
              eggs: Math.round(c.eggs),
              expected: Math.round(c.expected),
              ratio: c.ratio,
              isShort: c.isShort,
              exceptionId: covering[0]?.id ?? null,
              exceptionStatus: covering[0]?.status ?? null,
            };
          })
          .sort((a, b) => a.at - b.at);
      const byRow = lines('row');
      const byTier = lines('tier');
      // A tier under a tier exception in the window shows its cells against the tier's yardstick.
      const tierCells = withTierYardstick(
        judged,
        house.shortfallThresholdPct,
        new Set(byTier.filter((t) => t.exceptionId !== null).map((t) => t.at)),
      );
      const cells = tierCells.map((cell) => {
        const horizon = horizons.get(sectionIdOf.get(sectionKey(cell.row, cell.tier)) ?? -1);
        const covering = overlapping
          .filter((e) => coveredSections(e, layout).includes(sectionKey(cell.row, cell.tier)))
          .sort(
            (a, b) =>
              (a.status === 'closed' ? 1 : 0) - (b.status === 'closed' ? 1 : 0) ||
              (kindRank[a.kind] ?? 2) - (kindRank[b.kind] ?? 2),
          );
        const top =
          window.kind === 'today' ? covering.find((e) => e.status !== 'closed') : covering[0];
        return {
          ...cell,
          exceptionId: top?.id ?? null,
          exceptionKind: top?.kind ?? null,
          isLearning: top?.isLearning ?? false,
          dataUntil: horizon?.toISOString() ?? null,
          isDataLate:
            window.kind === 'today' &&
            newest > 0 &&
            newest - (horizon?.getTime() ?? 0) > DATA_LATE_MAP_MS,
        };
      });
      const belts = current.reduce((n, s) => n + s.eggs, 0);
      const collector = await collectorTotal(
        db,
        house.farmId,
        house.id,
        window.firstDay,
        window.lastDay,
      );
      let henDayPct: number | null = null;
      if (window.isComplete) {
        const hens = await hensAlive(db, house.id, window.firstDay, window.lastDay);
        const henDays = [...hens.values()].reduce((a, b) => a + b, 0);
        henDayPct =
          henDays > 0 ? Math.round((eggsLaid(belts, collector) / henDays) * 1000) / 10 : null;
      }
      const open = inWindow.filter((e) => e.status !== 'closed').length;
      return {
        houseId: house.id,
        farmId: house.farmId,
        houseName: house.name,
        rows: house.rows,
        tiers: house.tiers,
        timezone: house.timezone,
        window: {
          kind: window.kind,
          firstDay: window.firstDay,
          lastDay: window.lastDay,
          from: window.from.toISOString(),
          to: window.to.toISOString(),
          isComplete: window.isComplete,
        },
        cells,
        byRow,
        byTier,
        belts,
        collector,
        henDayPct,
        openExceptions: open,
        isJudgingPastDays: (await housesJudgingPastDays(db, [house.id])).has(house.id),
        updatedAt: new Date().toISOString(),
      };
    },
  };
}
