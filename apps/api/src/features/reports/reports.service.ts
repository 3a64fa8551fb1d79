import type {
  DailyReport,
  DailyReportQuery,
  FarmSummary,
  FarmSummaryQuery,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import {
  eggsLaid,
  henDayProductionPct,
  lostValue,
  productionWindow,
  toCsv,
} from '@tierscope/domain';
import { requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { notFound } from '../../platform/errors';
import { hensAlive } from '../evaluation/evaluation.repository';
import { listExceptions } from '../evaluation/exception-rows.repository';
import type { EvaluationService } from '../evaluation/evaluation.service';
import { toExceptionView } from '../exceptions/exceptions.service';
import { farmDays, farmLosses, farmWithHouses, houseWithFarm } from './reports.repository';

const round1 = (v: number | null) => (v === null ? null : Math.round(v * 10) / 10);

export interface ReportsService {
  daily(ctx: RequestContext, query: DailyReportQuery): Promise<DailyReport>;
  dailyCsv(ctx: RequestContext, query: DailyReportQuery): Promise<{ name: string; csv: string }>;
  farm(ctx: RequestContext, query: FarmSummaryQuery): Promise<FarmSummary>;
}

export function createReportsService(db: Database, evaluation: EvaluationService): ReportsService {
  async function daily(ctx: RequestContext, query: DailyReportQuery): Promise<DailyReport> {
    const found = await houseWithFarm(db, query.houseId);
    if (!found || !ctx.user.roles.has(found.house.farmId)) throw notFound('House');
    requireFarmPermission(ctx, found.house.farmId, 'farm.read', 'House');
    const { house } = found;
    const window = productionWindow('custom', new Date(), house, {
      firstDay: query.day,
      lastDay: query.day,
    });
    const map = await evaluation.buildMap(house.id, window);
    if (!map) throw notFound('House');
    const hens = (await hensAlive(db, house.id, query.day, query.day)).get(query.day) ?? null;
    const exceptions = await listExceptions(db, {
      farmIds: [house.farmId],
      houseId: house.id,
      from: window.from.toISOString(),
      to: window.to.toISOString(),
    });
    return {
      houseId: house.id,
      houseName: house.name,
      farmName: found.farmName,
      day: query.day,
      timezone: house.timezone,
      from: window.from.toISOString(),
      to: window.to.toISOString(),
      isComplete: window.isComplete,
      sections: map.cells.map((c) => ({
        row: c.row,
        tier: c.tier,
        eggs: c.eggs,
        expected: c.expected === null ? null : Math.round(c.expected),
        ratio: c.ratio,
        exceptionKind: c.exceptionKind,
        isLearning: c.isLearning,
      })),
      totals: {
        belts: map.belts,
        collector: map.collector,
        collectorGapPct:
          map.belts > 0 && map.collector > 0
            ? round1((100 * (map.collector - map.belts)) / map.belts)
            : null,
        hensAlive: hens,
        henDayPct: hens
          ? round1(henDayProductionPct(eggsLaid(map.belts, map.collector), hens))
          : null,
      },
      exceptions: exceptions.map((r) => toExceptionView(r.exception, r)),
    };
  }

  return {
    daily,

    async dailyCsv(ctx, query) {
      const report = await daily(ctx, query);
      const rows = report.sections.map((s) => [
        s.row,
        s.tier,
        s.eggs,
        s.expected,
        s.ratio === null ? null : Math.round(s.ratio * 1000) / 10,
        s.exceptionKind ?? '',
      ]);
      rows.push(['house', 'belts', report.totals.belts, null, null, '']);
      rows.push(['house', 'collector', report.totals.collector, null, null, '']);
      rows.push(['house', 'hen-day %', report.totals.henDayPct, null, null, '']);
      return {
        name: `${report.houseName}-${report.day}.csv`.replace(/[^\w.-]+/g, '-'),
        csv: toCsv(['row', 'tier', 'eggs', 'expected', 'percent_of_expected', 'exception'], rows),
      };
    },

    async farm(ctx, query) {
      requireFarmPermission(ctx, query.farmId, 'farm.read');
      const found = await farmWithHouses(db, query.farmId);
      if (!found) throw notFound('Farm');
      const days = await farmDays(db, query.farmId, query.from, query.to);
      const losses = await farmLosses(db, query.farmId, query.from, query.to);
      const houses = found.houses.map((h) => {
        const own = days.filter((d) => d.house_id === h.id);
        const eggs = own.reduce((s, d) => s + d.belts, 0);
        // Hen-day over the days the house counted (the hen-days below are those days' too).
        const laid = own
          .filter((d) => d.belts > 0)
          .reduce((s, d) => s + eggsLaid(d.belts, d.collector), 0);
        const henDays = own.filter((d) => d.belts > 0).reduce((s, d) => s + (d.hens ?? 0), 0);
        const loss = losses.get(h.id);
        const lost = loss?.lost ?? 0;
        return {
          houseId: h.id,
          houseName: h.name,
          eggs,
          collector: own.reduce((s, d) => s + d.collector, 0),
          henDays,
          henDayPct: round1(henDayProductionPct(laid, henDays)),
          exceptionsOpened: loss?.opened ?? 0,
          eggsLost: lost,
          eggsLostValue: lostValue(lost, h.eggPricePerDozen),
          days: own.map((d) => ({
            day: d.day,
            eggs: d.belts,
            henDayPct:
              d.hens && d.belts > 0
                ? round1(henDayProductionPct(eggsLaid(d.belts, d.collector), d.hens))
                : null,
          })),
        };
      });
      const eggs = houses.reduce((s, h) => s + h.eggs, 0);
      const laid = days
        .filter((d) => d.belts > 0)
        .reduce((s, d) => s + eggsLaid(d.belts, d.collector), 0);
      const henDays = houses.reduce((s, h) => s + h.henDays, 0);
      const values = houses.map((h) => h.eggsLostValue).filter((v): v is number => v !== null);
      return {
        farmId: found.farm.id,
        farmName: found.farm.name,
        currency: found.farm.currency,
        from: query.from,
        to: query.to,
        houses,
        totals: {
          eggs,
          henDayPct: round1(henDayProductionPct(laid, henDays)),
          exceptionsOpened: houses.reduce((s, h) => s + h.exceptionsOpened, 0),
          eggsLost: houses.reduce((s, h) => s + h.eggsLost, 0),
          eggsLostValue:
            values.length > 0 ? Math.round(values.reduce((a, b) => a + b, 0) * 100) / 100 : null,
        },
      };
    },
  };
}
