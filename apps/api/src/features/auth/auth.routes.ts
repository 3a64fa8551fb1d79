import { endpoints } from '@tierscope/contracts';
import type { RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit, type Store } from 'express-rate-limit';
import { contextOf } from '../../platform/auth';
import { AppError, errorBody } from '../../platform/errors';
import { declareRoutes, route } from '../../platform/route';
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
) {
  const limited = (prefix: string, isOnlyFailures = true) => [
    loginLimiter(limits.storeFor(prefix), limits.maxFailures, limits.windowSeconds, isOnlyFailures),
  ];
  return declareRoutes('Sign-in', [
    route({
      ...endpoints.auth.login,
      before: limited('login'),
      handle: ({ body }) => service.login(body),
    }),
    // The same answer, in the same time, whether or not the address has an account: the look-up and the
    // mail happen after the answer has gone, so neither its words nor its timing can find accounts.
    route({
      ...endpoints.auth.forgotPassword,
      before: limited('forgot', false),
      handle: ({ body }) => {
        setImmediate(() => {
          service.forgot(body).catch((error: unknown) => {
            log('password reset mail failed', error);
          });
        });
        return { message: 'If that address has an account, a link is on its way.' };
      },
    }),
    route({
      ...endpoints.auth.setPassword,
      before: limited('set-password'),
      handle: ({ body }) => service.setPassword(body),
    }),
    route({
      ...endpoints.auth.session,
      before: [authenticate],
      handle: ({ req }) => service.session(contextOf(req)),
    }),
  ]);
}
