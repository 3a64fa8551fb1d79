import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  calendarDay,
  cleanText,
  dbId,
  findUnsafeInput,
  idParam,
  instant,
  MAX_DB_ID,
  safeText,
  textProblem,
} from './primitives.schema';

describe('ids', () => {
  it('take what fits a PostgreSQL integer and nothing past it', () => {
    // PostgreSQL's `integer` is 4 bytes, -2147483648 to +2147483647 (PostgreSQL manual, §8.1 Numeric Types).
    expect(MAX_DB_ID).toBe(2147483647);
    expect(idParam.safeParse('2147483647').success).toBe(true);
    expect(idParam.safeParse('2147483648').success).toBe(false);
    expect(dbId.safeParse(2 ** 53 + 2).success).toBe(false);
    for (const bad of ['0', '-1', '1.5', 'abc', '', '1e3x']) {
      expect(idParam.safeParse(bad).success, bad).toBe(false);
    }
  });
});

describe('text', () => {
  it('names NUL and lone surrogates, and passes paired surrogates (emoji)', () => {
    expect(textProblem('a\u0000b')).toContain('NUL');
    expect(textProblem('\ud800')).toContain('lone surrogate');
    expect(textProblem('x\udc00')).toContain('lone surrogate');
    expect(textProblem('hens 🐔 row 4')).toBeNull();
    expect(safeText().safeParse('ok\u0000').success).toBe(false);
  });

  it('cleanText always gives storable text no longer than asked (fast-check, seeded)', () => {
    fc.assert(
      fc.property(
        fc.string({ unit: 'binary', maxLength: 400 }),
        fc.integer({ min: 2, max: 300 }),
        (value, max) => {
          const cleaned = cleanText(value, max);
          return textProblem(cleaned) === null && cleaned.length <= max;
        },
      ),
      { seed: 20261202, numRuns: 500 },
    );
  });

  it('cleanText keeps ordinary text as it is', () => {
    expect(cleanText('Row 4, tier 2: 1 203 eggs', 100)).toBe('Row 4, tier 2: 1 203 eggs');
    expect(cleanText('x'.repeat(10), 5)).toBe('xxxx…');
  });
});

describe('dates and times', () => {
  it('take days PostgreSQL can hold and the product can mean', () => {
    expect(calendarDay().safeParse('2026-11-01').success).toBe(true);
    expect(calendarDay().safeParse('0000-01-01').success).toBe(false);
    expect(calendarDay().safeParse('9999-12-31').success).toBe(false);
    expect(instant().safeParse('2026-11-01T06:00:00+01:00').success).toBe(true);
    expect(instant().safeParse('0000-01-01T00:00:00Z').success).toBe(false);
  });
});

describe('findUnsafeInput', () => {
  it('finds a NUL however deep it sits, and names where', () => {
    expect(findUnsafeInput({ a: [{ b: 'x\u0000' }] })).toEqual({
      path: 'a.0.b',
      message: 'Text contains a NUL character',
    });
  });

  it('finds prototype keys as JSON.parse leaves them', () => {
    expect(findUnsafeInput(JSON.parse('{"__proto__":{"x":1}}'))?.message).toContain('__proto__');
  });

  it('walks a hostile nesting without exhausting the stack', () => {
    let deep: unknown = 'end';
    for (let i = 0; i < 100_000; i++) deep = [deep];
    expect(findUnsafeInput(deep)?.message).toContain('Nested more than');
  });

  it('passes well-formed JSON values and finds a NUL planted anywhere in them (fast-check, seeded)', () => {
    const safeJson = fc
      .jsonValue({ maxDepth: 6, stringUnit: 'grapheme' })
      .filter((v) => !/\\u0000|__proto__|constructor|prototype/.test(JSON.stringify(v)));
    fc.assert(
      fc.property(safeJson, fc.nat(), (value, at) => {
        if (findUnsafeInput(value) !== null) return false;
        // Wrap at a random depth beside the value: the NUL must still be found.
        let planted: unknown = { note: 'a\u0000b' };
        for (let i = 0; i < at % 10; i++) planted = [planted];
        return findUnsafeInput({ value, planted }) !== null;
      }),
      { seed: 7, numRuns: 300 },
    );
  });
});
