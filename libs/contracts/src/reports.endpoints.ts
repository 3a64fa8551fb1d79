import { endpoint } from './endpoint';
import {
  dailyReportQuerySchema,
  dailyReportSchema,
  farmSummaryQuerySchema,
  farmSummarySchema,
} from './report.schema';
import { workOrderReportQuerySchema, workOrderReportSchema } from './work-order.schema';

export const reportsEndpoints = {
  daily: endpoint({
    method: 'get',
    path: '/reports/daily',
    summary:
      "One production day of a house: each section's eggs against expected, totals, hen-day, collector gap",
    permission: 'farm.read',
    query: dailyReportQuerySchema,
    answer: dailyReportSchema,
  }),
  dailyCsv: endpoint({
    method: 'get',
    path: '/reports/daily.csv',
    summary: 'The daily house report as CSV',
    permission: 'farm.read',
    query: dailyReportQuerySchema,
    answer: 'text/csv',
  }),
  farm: endpoint({
    method: 'get',
    path: '/reports/farm',
    summary: 'Farm summary across houses for a date range, with eggs lost to exceptions',
    permission: 'farm.read',
    query: farmSummaryQuerySchema,
    answer: farmSummarySchema,
  }),
  workOrders: endpoint({
    method: 'get',
    path: '/reports/work-orders',
    summary: 'Done work orders per house: time from exception to done, findings by cause',
    permission: 'workOrders.manage',
    query: workOrderReportQuerySchema,
    answer: workOrderReportSchema,
  }),
};
