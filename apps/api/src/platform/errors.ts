import type { ApiError } from '@tierscope/contracts';
import type { ErrorRequestHandler } from 'express';
import { z } from 'zod';

export type ErrorCode =
  | 'validation_failed'
  | 'unauthenticated'
  | 'invalid_credentials'
  | 'account_disabled'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'too_many_requests'
  | 'payload_too_large'
  | 'unavailable'
  | 'internal';

const STATUS: Record<ErrorCode, number> = {
  validation_failed: 400,
  unauthenticated: 401,
  invalid_credentials: 401,
  account_disabled: 403,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_many_requests: 429,
  payload_too_large: 413,
  unavailable: 503,
  internal: 500,
};

/** An error a service means to tell the caller about; anything else is a 500. */
export class AppError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly fields?: { path: string; message: string }[],
  ) {
    super(message);
    this.status = STATUS[code];
  }
}

export const notFound = (what: string) => new AppError('not_found', `${what} not found`);
export const forbidden = (message = 'Your role does not allow this') =>
  new AppError('forbidden', message);

/** Validates input against a contract schema, turning zod issues into field-level 400s. */
export function parseInput<S extends z.ZodType>(
  schema: S,
  value: unknown,
  where = 'body',
): z.infer<S> {
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  throw new AppError(
    'validation_failed',
    `The request ${where} is not valid`,
    result.error.issues.map((issue) => ({
      path: issue.path.length ? issue.path.join('.') : '(root)',
      message: issue.message,
    })),
  );
}

export function errorBody(error: AppError): ApiError {
  return {
    error: {
      code: error.code,
      message: error.message,
      ...(error.fields ? { fields: error.fields } : {}),
    },
  };
}

/** The one error middleware: typed errors keep their status, body-parser errors become 400/413, the rest 500. */
export function errorMiddleware(
  log: (message: string, error: unknown) => void,
): ErrorRequestHandler {
  return (error: unknown, _req, res, next) => {
    if (res.headersSent) {
      next(error);
      return;
    }
    let appError: AppError;
    if (error instanceof AppError) {
      appError = error;
    } else if (isDatabaseUnavailable(error)) {
      // Clients (gateways above all) retry a 503; nothing was written.
      appError = new AppError(
        'unavailable',
        'The database is not reachable right now: try again shortly',
      );
    } else if (isBodyParserError(error) && error.type === 'entity.too.large') {
      appError = new AppError('payload_too_large', 'The request body is too large');
    } else if (isBodyParserError(error)) {
      appError = new AppError('validation_failed', 'The request body is not valid JSON', [
        { path: '(root)', message: 'Malformed JSON' },
      ]);
    } else {
      log('unhandled error', error);
      appError = new AppError('internal', 'Something went wrong on our side');
    }
    res.status(appError.status).json(errorBody(appError));
  };
}

const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  '57P01',
  '57P02',
  '57P03',
  '08006',
  '08001',
  '08003',
]);

/** Connection-level failures of PostgreSQL (refused, dropped, shutting down), as pg or drizzle report them. */
function isDatabaseUnavailable(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && depth < 4; depth++) {
    const candidate = e as { code?: unknown; message?: unknown; cause?: unknown };
    if (typeof candidate.code === 'string' && UNAVAILABLE_CODES.has(candidate.code)) return true;
    if (
      typeof candidate.message === 'string' &&
      /Connection terminated|connection timeout/i.test(candidate.message)
    ) {
      return true;
    }
    e = candidate.cause;
  }
  return false;
}

function isBodyParserError(error: unknown): error is { type: string; status: number } {
  return typeof error === 'object' && error !== null && 'type' in error && 'status' in error;
}
