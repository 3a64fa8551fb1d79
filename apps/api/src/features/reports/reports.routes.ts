import { endpoints } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { ReportsService } from './reports.service';
import { workOrderReport } from './work-order-report';

export function reportsRoutes(service: ReportsService, db: Database) {
  return declareRoutes('Reports', [
    route({
      ...endpoints.reports.daily,
      handle: ({ req, query }) => service.daily(contextOf(req), query),
    }),
    route({
      ...endpoints.reports.dailyCsv,
      handle: async ({ req, res, query }) => {
        const { name, csv } = await service.dailyCsv(contextOf(req), query);
        res.type('text/csv; charset=utf-8').attachment(name).send(csv);
      },
    }),
    route({
      ...endpoints.reports.farm,
      handle: ({ req, query }) => service.farm(contextOf(req), query),
    }),
    route({
      ...endpoints.reports.workOrders,
      handle: ({ req, query }) => workOrderReport(db, contextOf(req), query),
    }),
  ]);
}
