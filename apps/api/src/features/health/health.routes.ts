import { healthSchema, type Health } from '@tierscope/contracts';
import type { Response } from 'express';
import { z } from 'zod';
import { declareRoutes, route } from '../../platform/route';

/**
 * For load balancers, orchestrators and `npm start`; no sign-in needed.
 * - `/health` and `/health/ready`: this process takes work — the database answers and it is not stopping
 *   (503 otherwise, so a balancer sends requests elsewhere during a rolling restart);
 * - `/health/live`: the process is up (restart it when this fails, not when the database is down), and
 *   which process it is.
 */
export function healthRoutes(
  pingDatabase: () => Promise<boolean>,
  version: string,
  isReady: () => boolean = () => true,
  processId?: string,
) {
  const ready = async ({ res }: { res: Response }) => {
    const isUp = await pingDatabase();
    const isTakingWork = isUp && isReady();
    const body: Health = {
      status: isTakingWork ? 'ok' : isUp ? 'stopping' : 'degraded',
      database: isUp ? 'up' : 'down',
      version,
    };
    res.status(isTakingWork ? 200 : 503).json(body);
  };
  const readiness = {
    method: 'get',
    access: 'public',
    answer: healthSchema,
    errors: { 503: 'Database down, or stopping' },
    handle: ready,
  } as const;
  return declareRoutes('Health', [
    route({
      ...readiness,
      path: '/health',
      summary: 'Takes work: the database answers and the process is not stopping',
    }),
    route({
      ...readiness,
      path: '/health/ready',
      summary: 'Readiness (as /api/health): 503 while the database is down or the process stops',
    }),
    route({
      method: 'get',
      path: '/health/live',
      access: 'public',
      summary: 'Liveness: the process is up, and which process answered (behind a balancer)',
      answer: z.object({
        status: z.literal('ok'),
        version: z.string(),
        process: z.string().optional(),
      }),
      handle: () => ({ status: 'ok', version, ...(processId ? { process: processId } : {}) }),
    }),
  ]);
}
