import { loginRequestSchema } from '@tierscope/contracts';
import { Router, type RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { contextOf } from '../../platform/auth';
import { AppError, errorBody, parseInput } from '../../platform/errors';
import type { AuthService } from './auth.service';

/**
 * Failed sign-ins are limited per address and e-mail; successful ones do not count, so a user who
 * mistypes a few times and then gets it right is not locked out.
 */
function loginLimiter(maxFailures: number, windowSeconds: number) {
  return rateLimit({
    windowMs: windowSeconds * 1000,
    limit: maxFailures,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => {
      const body = req.body as { email?: unknown } | undefined;
      const email = typeof body?.email === 'string' ? body.email.toLowerCase() : '';
      return `${ipKeyGenerator(req.ip ?? '')}|${email}`;
    },
    handler: (_req, res) => {
      res
        .status(429)
        .json(
          errorBody(
            new AppError(
              'too_many_requests',
              'Too many failed sign-ins: wait a few minutes and try again',
            ),
          ),
        );
    },
  });
}

export function authRoutes(
  service: AuthService,
  authenticate: RequestHandler,
  limits: { maxFailures: number; windowSeconds: number },
): Router {
  const router = Router();
  router.post(
    '/login',
    loginLimiter(limits.maxFailures, limits.windowSeconds),
    async (req, res) => {
      res.json(await service.login(parseInput(loginRequestSchema, req.body)));
    },
  );
  router.get('/me', authenticate, async (req, res) => {
    res.json(await service.session(contextOf(req)));
  });
  return router;
}
