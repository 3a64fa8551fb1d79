import type { Health } from '@tierscope/contracts';
import { Router, type RequestHandler } from 'express';

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
): Router {
  const router = Router();
  const ready: RequestHandler = async (_req, res) => {
    const isUp = await pingDatabase();
    const isTakingWork = isUp && isReady();
    const body: Health = {
      status: isTakingWork ? 'ok' : isUp ? 'stopping' : 'degraded',
      database: isUp ? 'up' : 'down',
      version,
    };
    res.status(isTakingWork ? 200 : 503).json(body);
  };
  router.get('/health', ready);
  router.get('/health/ready', ready);
  router.get('/health/live', (_req, res) => {
    // Which process answered (behind a balancer), as its leases name it.
    res.json({ status: 'ok', version, ...(processId ? { process: processId } : {}) });
  });
  return router;
}
