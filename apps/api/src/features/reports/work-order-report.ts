import type { WorkOrderReport, WorkOrderReportQuery } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import {
  addDays,
  calendarDayOf,
  FINDING_CAUSES,
  hoursToDone,
  type FindingCause,
} from '@tierscope/domain';
import { requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { doneOrdersBetween } from '../work-orders/work-orders.repository';

/** Done work orders per house over a period: time from exception to done, and findings by cause. */
export async function workOrderReport(
  db: Database,
  ctx: RequestContext,
  query: WorkOrderReportQuery,
): Promise<WorkOrderReport> {
  requireFarmPermission(ctx, query.farmId, 'workOrders.manage');
  const to = query.to ?? calendarDayOf(new Date(), 'UTC');
  const from = query.from ?? addDays(to, -29);
  const rows = await doneOrdersBetween(
    db,
    query.farmId,
    new Date(`${from}T00:00:00Z`),
    new Date(`${addDays(to, 1)}T00:00:00Z`),
  );
  const byHouse = new Map<number, typeof rows>();
  for (const r of rows) byHouse.set(r.houseId, [...(byHouse.get(r.houseId) ?? []), r]);
  return {
    farmId: query.farmId,
    from,
    to,
    houses: [...byHouse.values()].map((list) => {
      const first = list[0];
      const timing = hoursToDone(
        list.flatMap((r) =>
          r.exceptionOpenedAt && r.doneAt
            ? [{ exceptionOpenedAt: r.exceptionOpenedAt, doneAt: r.doneAt }]
            : [],
        ),
      );
      const byCause = Object.fromEntries(FINDING_CAUSES.map((c) => [c, 0])) as Record<
        FindingCause,
        number
      >;
      for (const r of list) if (r.findingCause) byCause[r.findingCause] += 1;
      return {
        houseId: first?.houseId ?? 0,
        houseName: first?.houseName ?? '',
        done: list.length,
        fromExceptions: timing.count,
        medianHoursToDone: timing.medianHours,
        maxHoursToDone: timing.maxHours,
        byCause,
      };
    }),
  };
}
