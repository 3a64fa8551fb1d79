import { z } from 'zod';

/**
 * The building blocks every contract validates its edges with, so that nothing PostgreSQL cannot store
 * reaches a query: ids that fit its `integer`, text without NUL or broken UTF-16, dates it can hold.
 */

/** PostgreSQL `integer` (serial ids) ends here; a larger id cannot name a row. */
export const MAX_DB_ID = 2 ** 31 - 1;

/** The first and last calendar day the product accepts anywhere (dates, windows, report ranges). */
export const EARLIEST_DAY = '1970-01-01';
export const LATEST_DAY = '2199-12-31';

/** A positive database id in a body or a live message. */
export const dbId = z
  .number('An id is a number')
  .int('An id is a whole number')
  .positive('An id is positive')
  .max(MAX_DB_ID, 'No such id');

/** A positive database id as it appears in a URL path or query (text, coerced). */
export const idParam = z.coerce
  .number('An id is a number')
  .int('An id is a whole number')
  .positive('An id is positive')
  .max(MAX_DB_ID, 'No such id');

/** The path parameters most routes name: a farm, a house. */
export const farmPath = z.object({ farmId: idParam });
export const housePath = z.object({ houseId: idParam });

const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** Why a text cannot be stored as it is, or null when it can. */
export function textProblem(value: string): string | null {
  if (value.includes('\u0000')) return 'contains a NUL character';
  if (LONE_SURROGATE.test(value)) return 'contains broken Unicode (a lone surrogate)';
  return null;
}

/** A string PostgreSQL can store as `text` and `jsonb`. */
export const safeText = () =>
  z.string().superRefine((value, ctx) => {
    const problem = textProblem(value);
    if (problem) ctx.addIssue({ code: 'custom', message: `Text ${problem}` });
  });

/** A calendar day (YYYY-MM-DD) between EARLIEST_DAY and LATEST_DAY. */
export const calendarDay = (message = 'A date such as 2026-11-01') =>
  z.iso
    .date(message)
    .refine(
      (day) => day >= EARLIEST_DAY && day <= LATEST_DAY,
      `Dates run from ${EARLIEST_DAY} to ${LATEST_DAY}`,
    );

/** An ISO-8601 instant with an offset, between EARLIEST_DAY and LATEST_DAY. */
export const instant = (message = 'A time such as 2026-11-01T06:00:00Z') =>
  z.iso.datetime({ offset: true, error: message }).refine((value) => {
    const ms = Date.parse(value);
    return (
      Number.isFinite(ms) &&
      ms >= Date.parse(`${EARLIEST_DAY}T00:00:00Z`) &&
      ms <= Date.parse(`${LATEST_DAY}T23:59:59Z`)
    );
  }, `Times run from ${EARLIEST_DAY} to ${LATEST_DAY}`);

export interface UnsafeInput {
  path: string;
  message: string;
}

/** File names are kept for people to recognise a file, never longer than this. */
export const MAX_FILE_NAME_LENGTH = 200;

/** Deeper than this, a JSON value is not a request any screen or gateway sends. */
export const MAX_INPUT_DEPTH = 32;

/**
 * The first place in a parsed JSON value (body or query) that no route can take: a string with NUL or a
 * lone surrogate, a key that would touch an object's prototype, or nesting deeper than MAX_INPUT_DEPTH.
 * Walks without recursion, so a hostile nesting cannot exhaust the stack.
 */
export function findUnsafeInput(value: unknown): UnsafeInput | null {
  const stack: { value: unknown; path: string; depth: number }[] = [{ value, path: '', depth: 0 }];
  while (stack.length > 0) {
    const item = stack.pop();
    if (!item) break;
    const where = item.path || '(root)';
    if (typeof item.value === 'string') {
      const problem = textProblem(item.value);
      if (problem) return { path: where, message: `Text ${problem}` };
      continue;
    }
    if (typeof item.value !== 'object' || item.value === null) continue;
    if (item.depth >= MAX_INPUT_DEPTH) {
      return { path: where, message: `Nested more than ${MAX_INPUT_DEPTH} levels deep` };
    }
    for (const [key, child] of Object.entries(item.value)) {
      const problem = textProblem(key);
      if (problem) return { path: where, message: `A key ${problem}` };
      if (key === '__proto__' || key === 'constructor' || key === 'prototype') {
        return { path: where, message: `The key "${key}" is not accepted` };
      }
      stack.push({
        value: child,
        path: item.path ? `${item.path}.${key}` : key,
        depth: item.depth + 1,
      });
    }
  }
  return null;
}

/**
 * Text taken from a file or a library's error (a file name, a CSV cell, a parser message) made safe to
 * store and short enough to show: NUL and other control characters and lone surrogates become U+FFFD,
 * and anything past `maxLength` characters is cut with an ellipsis.
 */
export function cleanText(value: string, maxLength: number): string {
  const cleaned = value.replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/g, '\uFFFD');
  const wellFormed = cleaned.replace(
    /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g,
    '\uFFFD',
  );
  if (wellFormed.length <= maxLength) return wellFormed;
  // Never cut a surrogate pair in half.
  let cut = maxLength - 1;
  const last = wellFormed.charCodeAt(cut - 1);
  if (last >= 0xd800 && last <= 0xdbff) cut -= 1;
  return `${wellFormed.slice(0, cut)}…`;
}
