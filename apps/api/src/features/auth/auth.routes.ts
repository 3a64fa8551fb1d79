import { forgotPasswordSchema, loginRequestSchema, setPasswordSchema } from '@tierscope/contracts';
import { Router, type RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit, type Store } from 'express-rate-limit';
import { contextOf } from '../../platform/auth';
import { AppError, errorBody, parseInput } from '../../platform/errors';
import type { AuthService } from './auth.service';

/**
 * Failed sign-ins are limited per address and e-mail; successful ones do not count, so a user who
 * mistypes a few times and then gets it right is not locked out. Reset requests count every time, so the
 * route cannot be used to flood someone's inbox.
 */
function loginLimiter(
  store: Store,
  maxFailures: number,
  windowSeconds: number,
  isOnlyFailures = true,
) {
  return rateLimit({
    store,
    windowMs: windowSeconds * 1000,
    limit: maxFailures,
    skipSuccessfulRequests: isOnlyFailures,
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
  limits: {
    maxFailures: number;
    windowSeconds: number;
    /** where counts are kept (shared by every process): one store per limiter, by its prefix */
    storeFor: (prefix: string) => Store;
  },
  log: (message: string, error?: unknown) => void,
): Router {
  const router = Router();
  router.post(
    '/login',
    loginLimiter(limits.storeFor('login'), limits.maxFailures, limits.windowSeconds),
    async (req, res) => {
      res.json(await service.login(parseInput(loginRequestSchema, req.body)));
    },
  );
  // The same answer, in the same time, whether or not the address has an account: the look-up and the
  // mail happen after the answer has gone, so neither its words nor its timing can find accounts.
  router.post(
    '/forgot',
    loginLimiter(limits.storeFor('forgot'), limits.maxFailures, limits.windowSeconds, false),
    (req, res) => {
      const input = parseInput(forgotPasswordSchema, req.body);
      res.status(202).json({ message: 'If that address has an account, a link is on its way.' });
      setImmediate(() => {
        service.forgot(input).catch((error: unknown) => {
          log('password reset mail failed', error);
        });
      });
    },
  );
  router.post(
    '/set-password',
    loginLimiter(limits.storeFor('set-password'), limits.maxFailures, limits.windowSeconds),
    async (req, res) => {
      res.json(await service.setPassword(parseInput(setPasswordSchema, req.body)));
    },
  );
  router.get('/me', authenticate, async (req, res) => {
    res.json(await service.session(contextOf(req)));
  });
  return router;
}
