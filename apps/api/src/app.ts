import { randomUUID } from 'node:crypto';
import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { Database } from '@tierscope/db';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { authRoutes } from './features/auth/auth.routes';
import { countersRoutes } from './features/counters/counters.routes';
import { createCountersService } from './features/counters/counters.service';
import { gatewaysRoutes } from './features/gateways/gateways.routes';
import { createGatewaysService } from './features/gateways/gateways.service';
import { ingestRoutes } from './features/ingest/ingest.routes';
import { createIngestService } from './features/ingest/ingest.service';
import { createAuthService } from './features/auth/auth.service';
import { farmsRoutes } from './features/farms/farms.routes';
import { createFarmsService } from './features/farms/farms.service';
import { pingDatabase } from './features/health/health.repository';
import { healthRoutes } from './features/health/health.routes';
import { housesRoutes } from './features/houses/houses.routes';
import { createHousesService } from './features/houses/houses.service';
import { loadActiveUser } from './features/users/users.repository';
import { usersRoutes } from './features/users/users.routes';
import { createUsersService } from './features/users/users.service';
import { createAuthenticator } from './platform/auth';
import type { AppConfig } from './platform/config';
import { AppError, errorMiddleware } from './platform/errors';
import { createEventBus, type EventBus } from './platform/events';
import { inputGuard } from './platform/input-guard';
import { PostgresRateLimitStore } from './platform/rate-limit-store';
import { apiDocsRoutes } from './platform/api-docs';
import { buildOpenApiDocument } from './platform/openapi';
import { declareRoutes, route, routeOperations, type DeclaredRoutes } from './platform/route';
import type { ZodOpenApiPathsObject } from 'zod-openapi';
import { z } from 'zod';
import { createTokenService, type TokenService } from './platform/tokens';
import {
  EVALUATION_INTERVAL_MS,
  EvaluationScheduler,
} from './features/evaluation/evaluation-scheduler';
import {
  createEvaluationService,
  type EvaluationService,
} from './features/evaluation/evaluation.service';
import { exceptionsRoutes } from './features/exceptions/exceptions.routes';
import {
  createExceptionsService,
  type ExceptionsService,
} from './features/exceptions/exceptions.service';

import { createMailer, type Mailer } from './platform/mailer';
import { createNotifier, type Notifier } from './features/notifications/notifier';
import { notificationsRoutes } from './features/notifications/notifications.routes';
import { workOrdersRoutes } from './features/work-orders/work-orders.routes';
import { createWorkOrdersService } from './features/work-orders/work-orders.service';
import { ImportRunner } from './features/imports/import-runner';
import { flocksRoutes } from './features/flocks/flocks.routes';
import { reportsRoutes } from './features/reports/reports.routes';
import { createReportsService } from './features/reports/reports.service';
import { createFlocksService } from './features/flocks/flocks.service';
import { createFlockCurves } from './features/flocks/flock-curves';
import { importsRoutes } from './features/imports/imports.routes';
import { createImportsService } from './features/imports/imports.service';

export const API_VERSION = '0.1.0';

export interface AppDeps {
  db: Database;
  config: Pick<
    AppConfig,
    | 'jwtSecret'
    | 'tokenTtlSeconds'
    | 'loginMaxFailures'
    | 'loginWindowSeconds'
    | 'webDist'
    | 'publicUrl'
    | 'smtpUrl'
    | 'mailFrom'
    | 'mailCatcherUrl'
    | 'exceptionMailSeconds'
    | 'dataDir'
    | 'photoMaxBytes'
    | 'importMaxBytes'
  > &
    Partial<Pick<AppConfig, 'logEvaluations'>>;
  log?: (message: string, error?: unknown) => void;
  /** Operational lines (ingest counts); tests pass a no-op. */
  info?: (message: string) => void;
  /** Domain events (the server passes the cluster bus); tests pass their own to listen. */
  events?: EventBus;
  /** this process's name on leases (one process evaluates a house or runs an import at a time) */
  holder?: string;
  /** false once the process is stopping: /api/health/ready answers 503 so the balancer moves on */
  isReady?: () => boolean;
}

/** The long-lived parts shared by the HTTP app, the live socket and the timers. */
export interface Runtime {
  events: EventBus;
  tokens: TokenService;
  evaluation: EvaluationService;
  exceptions: ExceptionsService;
  scheduler: EvaluationScheduler;
  mailer: Mailer;
  notifier: Notifier;
  imports: ImportRunner;
}

export function createRuntime({
  db,
  config,
  log = defaultLog,
  info = defaultInfo,
  events = createEventBus(),
  holder = randomUUID(),
}: Pick<AppDeps, 'db' | 'config' | 'log' | 'info' | 'events' | 'holder'>): Runtime {
  const tokens = createTokenService(config.jwtSecret, config.tokenTtlSeconds);
  const evaluation = createEvaluationService(db, events, createFlockCurves(db, events));
  const mailer = createMailer({ smtpUrl: config.smtpUrl, from: config.mailFrom, info });
  const notifier = createNotifier({
    db,
    mailer,
    publicUrl: config.publicUrl,
    exceptionMailSeconds: config.exceptionMailSeconds,
    log,
  });
  return {
    mailer,
    notifier,
    imports: new ImportRunner(db, events, join(config.dataDir, 'imports'), log, {}, holder),
    events,
    tokens,
    evaluation,
    exceptions: createExceptionsService(db, evaluation, events),
    scheduler: new EvaluationScheduler(db, evaluation, events, log, {
      intervalMs: EVALUATION_INTERVAL_MS,
      holder,
      trace: config.logEvaluations ? info : undefined,
    }),
  };
}

/** Builds the whole HTTP app without listening, so tests run it in-process. */
export function createApp(deps: AppDeps & { runtime?: Runtime }): Express {
  const { db, config, log = defaultLog, info = defaultInfo } = deps;
  const runtime = deps.runtime ?? createRuntime(deps);
  const { events, tokens } = runtime;
  const app = express();
  app.disable('x-powered-by');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Angular Material sets inline style attributes; scripts stay same-origin only.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'connect-src': ["'self'"],
        },
      },
    }),
  );
  // The routes declared once (platform/route.ts): mounted here, and listed in the OpenAPI document.
  const declared: ZodOpenApiPathsObject = {};
  const mount = (router: express.Router, prefix: string, feature: DeclaredRoutes) => {
    router.use(feature.router);
    Object.assign(declared, routeOperations(prefix, feature));
  };
  // The ingest route parses its own, larger bodies, after checking the gateway key.
  const ingest = express.Router();
  mount(ingest, '/api/v1', ingestRoutes(db, createIngestService(db, events), info));
  app.use('/api/v1', ingest);
  app.use(express.json({ limit: '1mb' }));
  app.use(inputGuard());

  const authenticate = createAuthenticator(tokens, (id) => loadActiveUser(db, id));

  const health = express.Router();
  mount(
    health,
    '/api',
    healthRoutes(() => pingDatabase(db), API_VERSION, deps.isReady ?? (() => true), deps.holder),
  );
  app.use('/api', health);
  const docs = apiDocsRoutes();
  const docsRouter = express.Router();
  mount(docsRouter, '/api', docs);
  docsRouter.use('/docs', docs.files);
  app.use('/api', docsRouter);

  const v1 = express.Router();
  let openApi: object = {};
  mount(
    v1,
    '/api/v1',
    declareRoutes('API document', [
      route({
        method: 'get',
        path: '/openapi.json',
        summary: 'This document (OpenAPI 3.1)',
        access: 'public',
        answer: z.record(z.string(), z.unknown()),
        handle: () => openApi,
      }),
    ]),
  );
  const auth = express.Router();
  mount(
    auth,
    '/api/v1',
    authRoutes(
      createAuthService(db, tokens, runtime.notifier, events),
      authenticate,
      {
        maxFailures: config.loginMaxFailures,
        windowSeconds: config.loginWindowSeconds,
        storeFor: (prefix) => new PostgresRateLimitStore(db, prefix),
      },
      log,
    ),
  );
  v1.use(auth);

  v1.use(authenticate);
  mount(v1, '/api/v1', farmsRoutes(createFarmsService(db)));
  mount(v1, '/api/v1', housesRoutes(createHousesService(db)));
  mount(v1, '/api/v1', usersRoutes(createUsersService(db, runtime.notifier, events)));
  mount(v1, '/api/v1', gatewaysRoutes(createGatewaysService(db)));
  mount(v1, '/api/v1', countersRoutes(createCountersService(db, events)));
  mount(v1, '/api/v1', exceptionsRoutes(runtime.exceptions));
  mount(
    v1,
    '/api/v1',
    workOrdersRoutes(
      createWorkOrdersService({
        db,
        notifier: runtime.notifier,
        exceptions: runtime.exceptions,
        photosDir: join(config.dataDir, 'photos'),
      }),
      config.photoMaxBytes,
    ),
  );
  mount(v1, '/api/v1', notificationsRoutes(db, config.mailCatcherUrl));
  mount(v1, '/api/v1', flocksRoutes(createFlocksService(db, events)));
  mount(v1, '/api/v1', reportsRoutes(createReportsService(db, runtime.evaluation), db));
  mount(
    v1,
    '/api/v1',
    importsRoutes(createImportsService(db, runtime.imports), {
      importsDir: join(config.dataDir, 'imports'),
      maxBytes: config.importMaxBytes,
    }),
  );
  app.use('/api/v1', v1);
  openApi = buildOpenApiDocument(API_VERSION, declared);
  app.use('/api', (_req, _res, next) => {
    next(new AppError('not_found', 'No such API route'));
  });

  if (config.webDist) serveWebApp(app, config.webDist);
  app.use(errorMiddleware(log));
  return app;
}

/** Serves the built Angular app, answering deep links with index.html so the router can take them. */
function serveWebApp(app: Express, dist: string): void {
  const root = resolve(dist);
  if (!existsSync(join(root, 'index.html'))) {
    throw new Error(
      `WEB_DIST ${root} has no index.html: build the web app first (npm run build:web)`,
    );
  }
  app.use(express.static(root, { index: false, maxAge: '1h' }));
  app.get('/{*path}', (_req, res) => {
    res.sendFile(join(root, 'index.html'));
  });
}

function defaultInfo(message: string): void {
  console.log(`[api] ${message}`);
}

function defaultLog(message: string, error?: unknown): void {
  console.error(`[api] ${message}`, error ?? '');
}
