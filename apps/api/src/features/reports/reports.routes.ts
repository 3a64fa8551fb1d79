import { dailyReportQuerySchema, farmSummaryQuerySchema } from '@tierscope/contracts';
import { Router } from 'express';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { ReportsService } from './reports.service';

export function reportsRoutes(service: ReportsService): Router {
  const router = Router();
  router.get('/reports/daily', async (req, res) => {
    res.json(
      await service.daily(contextOf(req), parseInput(dailyReportQuerySchema, req.query, 'query')),
    );
  });
  router.get('/reports/daily.csv', async (req, res) => {
    const { name, csv } = await service.dailyCsv(
      contextOf(req),
      parseInput(dailyReportQuerySchema, req.query, 'query'),
    );
    res.type('text/csv; charset=utf-8').attachment(name).send(csv);
  });
  router.get('/reports/farm', async (req, res) => {
    res.json(
      await service.farm(contextOf(req), parseInput(farmSummaryQuerySchema, req.query, 'query')),
    );
  });
  return router;
}
