import { z } from 'zod';

const configSchema = z.object({
  DATABASE_URL: z.url('DATABASE_URL must be a postgres:// URL'),
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  HOST: z.string().default('127.0.0.1'),
  JWT_SECRET: z.string().min(32, 'JWT_SECRET must be at least 32 characters'),
  TOKEN_TTL_SECONDS: z.coerce
    .number()
    .int()
    .positive()
    .default(12 * 3600),
  LOGIN_MAX_FAILURES: z.coerce.number().int().positive().default(10),
  LOGIN_WINDOW_SECONDS: z.coerce
    .number()
    .int()
    .positive()
    .default(15 * 60),
  WEB_DIST: z.string().optional(),
  PUBLIC_URL: z.string().optional(),
  READINGS_RETENTION_MONTHS: z.coerce.number().int().min(1).default(25),
  SMTP_URL: z
    .string()
    .regex(/^smtps?:\/\//, 'SMTP_URL must be an smtp:// or smtps:// URL')
    .optional(),
  MAIL_FROM: z.string().default('Tierscope <tierscope@localhost>'),
  MAIL_CATCHER_URL: z.url('MAIL_CATCHER_URL must be an http:// URL').optional(),
  EXCEPTION_MAIL_SECONDS: z.coerce.number().int().min(1).default(120),
  DATA_DIR: z.string().default('.data'),
  PHOTO_MAX_BYTES: z.coerce
    .number()
    .int()
    .positive()
    .default(8 * 1024 * 1024),
  IMPORT_MAX_BYTES: z.coerce
    .number()
    .int()
    .positive()
    .default(500 * 1024 * 1024),
  /** after SIGTERM, how long the process fails readiness before it closes (a balancer moves on meanwhile) */
  SHUTDOWN_DRAIN_MS: z.coerce.number().int().min(0).default(1500),
  /** one log line per house evaluation (which process, when): for operators, and the cluster suite */
  LOG_EVALUATIONS: z.stringbool().default(false),
});

export interface AppConfig {
  databaseUrl: string;
  port: number;
  host: string;
  jwtSecret: string;
  tokenTtlSeconds: number;
  loginMaxFailures: number;
  loginWindowSeconds: number;
  /** Folder of the built web app to serve; the API alone when absent. */
  webDist: string | undefined;
  publicUrl: string;
  /** Raw readings older than this many months are dropped; rollups stay. */
  readingsRetentionMonths: number;
  /** the mail service; no mail is sent (only logged) when absent */
  smtpUrl: string | undefined;
  mailFrom: string;
  /** the local mail catcher's JSON endpoint, when it is the configured transport (dev and demo) */
  mailCatcherUrl: string | undefined;
  /** new exceptions are gathered this long, then mailed per house */
  exceptionMailSeconds: number;
  /** photos and other uploads live under here */
  dataDir: string;
  photoMaxBytes: number;
  /** the largest historical export accepted (streamed to disk, never held in memory) */
  importMaxBytes: number;
  shutdownDrainMs: number;
  /** one log line per house evaluation (which process judged which house, from when to when) */
  logEvaluations: boolean;
}

/** Reads the API's settings from the environment; a bad value stops the start with its name. */
export function loadConfig(env: NodeJS.ProcessEnv): AppConfig {
  // An empty variable (`SMTP_URL=` in a compose file) means "not set", not an invalid value.
  const parsed = configSchema.safeParse(
    Object.fromEntries(Object.entries(env).filter(([, value]) => value !== '')),
  );
  if (!parsed.success) {
    const problems = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new Error(`Invalid configuration: ${problems}`);
  }
  const c = parsed.data;
  return {
    databaseUrl: c.DATABASE_URL,
    port: c.PORT,
    host: c.HOST,
    jwtSecret: c.JWT_SECRET,
    tokenTtlSeconds: c.TOKEN_TTL_SECONDS,
    loginMaxFailures: c.LOGIN_MAX_FAILURES,
    loginWindowSeconds: c.LOGIN_WINDOW_SECONDS,
    webDist: c.WEB_DIST,
    publicUrl: c.PUBLIC_URL ?? `http://${c.HOST}:${c.PORT}`,
    readingsRetentionMonths: c.READINGS_RETENTION_MONTHS,
    smtpUrl: c.SMTP_URL,
    mailFrom: c.MAIL_FROM,
    mailCatcherUrl: c.MAIL_CATCHER_URL,
    exceptionMailSeconds: c.EXCEPTION_MAIL_SECONDS,
    dataDir: c.DATA_DIR,
    photoMaxBytes: c.PHOTO_MAX_BYTES,
    importMaxBytes: c.IMPORT_MAX_BYTES,
    shutdownDrainMs: c.SHUTDOWN_DRAIN_MS,
    logEvaluations: c.LOG_EVALUATIONS,
  };
}
