import {
  dailyReportQuerySchema,
  dailyReportSchema,
  farmSummaryQuerySchema,
  farmSummarySchema,
  workOrderReportQuerySchema,
  workOrderReportSchema,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { ReportsService } from './reports.service';
import { workOrderReport } from './work-order-report';

export function reportsRoutes(service: ReportsService, db: Database) {
  return declareRoutes('Reports', [
    route({
      method: 'get',
      path: '/reports/daily',
      summary:
        "One production day of a house: each section's eggs against expected, totals, hen-day, collector gap",
      query: dailyReportQuerySchema,
      answer: dailyReportSchema,
      handle: ({ req, query }) => service.daily(contextOf(req), query),
    }),
    route({
      method: 'get',
      path: '/reports/daily.csv',
      summary: 'The daily house report as CSV',
      query: dailyReportQuerySchema,
      answer: 'text/csv',
      handle: async ({ req, res, query }) => {
        const { name, csv } = await service.dailyCsv(contextOf(req), query);
        res.type('text/csv; charset=utf-8').attachment(name).send(csv);
      },
    }),
    route({
      method: 'get',
      path: '/reports/farm',
      summary: 'Farm summary across houses for a date range, with eggs lost to exceptions',
      query: farmSummaryQuerySchema,
      answer: farmSummarySchema,
      handle: ({ req, query }) => service.farm(contextOf(req), query),
    }),
    route({
      method: 'get',
      path: '/reports/work-orders',
      summary: 'Done work orders per house: time from exception to done, findings by cause',
      query: workOrderReportQuerySchema,
      answer: workOrderReportSchema,
      handle: ({ req, query }) => workOrderReport(db, contextOf(req), query),
    }),
  ]);
}
