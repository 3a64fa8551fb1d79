import { findUnsafeInput } from '@tierscope/contracts';
import type { RequestHandler } from 'express';
import { AppError } from './errors';

/**
 * Refuses, before any route sees it, a body or query that no route can store: text with NUL or a lone
 * surrogate (PostgreSQL rejects both in `text` and `jsonb`), prototype keys, hostile nesting. Each route's
 * own zod contract then checks the shape.
 */
export function inputGuard(): RequestHandler {
  return (req, _res, next) => {
    const where: [string, unknown][] = [
      ['query', req.query],
      ['body', req.body],
    ];
    for (const [part, value] of where) {
      const unsafe = findUnsafeInput(value);
      if (unsafe) {
        next(
          new AppError('validation_failed', `The request ${part} is not valid`, [
            { path: unsafe.path, message: unsafe.message },
          ]),
        );
        return;
      }
    }
    next();
  };
}
