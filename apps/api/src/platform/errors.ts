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
  | 'unsupported_media_type'
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
  unsupported_media_type: 415,
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
    } else if (isClientError(error)) {
      appError = clientError(error);
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

/**
 * An error that Express, body-parser or zlib raised about the request itself (http-errors style: a 4xx
 * `status`): a path that is not valid percent-encoding, a body that is not JSON, an encoding or charset
 * not taken, a compressed body that does not inflate, a body too large once inflated.
 */
function isClientError(error: unknown): error is { status: number; type?: unknown } {
  if (typeof error !== 'object' || error === null || !('status' in error)) return false;
  const { status } = error;
  return typeof status === 'number' && status >= 400 && status < 500;
}

function clientError(error: { status: number; type?: unknown }): AppError {
  if (error.status === 413 || error.type === 'entity.too.large') {
    return new AppError('payload_too_large', 'The request body is too large');
  }
  if (error.status === 415) {
    return new AppError(
      'unsupported_media_type',
      'Send JSON in UTF-8, uncompressed or with gzip or deflate',
    );
  }
  if (error.type === 'entity.parse.failed') {
    return new AppError('validation_failed', 'The request body is not valid JSON', [
      { path: '(root)', message: 'Malformed JSON' },
    ]);
  }
  if (
    error instanceof URIError ||
    /decode param/i.test(error instanceof Error ? error.message : '')
  ) {
    return new AppError('validation_failed', 'The request path is not valid', [
      { path: 'path', message: 'Not valid percent-encoding' },
    ]);
  }
  return new AppError('validation_failed', 'The request could not be read', [
    { path: '(root)', message: 'Malformed request body' },
  ]);
}
