import type { Health } from '@tierscope/contracts';
import { Router } from 'express';

/** Database reachability for load balancers and for `npm start` to wait on; no sign-in needed. */
export function healthRoutes(pingDatabase: () => Promise<boolean>, version: string): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const isUp = await pingDatabase();
    const body: Health = {
      status: isUp ? 'ok' : 'degraded',
      database: isUp ? 'up' : 'down',
      version,
    };
    res.status(isUp ? 200 : 503).json(body);
  });
  return router;
}
