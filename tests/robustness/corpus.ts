import fc from 'fast-check';

/**
 * Malformed input of every class the hardening issue found (and a few more), kept as data so that a new
 * route is walked with all of it without a line of its own.
 */

/** Path parameter values no route may take: each must be a 4xx, never a 5xx or a 2xx. */
export const BAD_PATH_VALUES = [
  '2147483648', // one past PostgreSQL's integer
  '9007199254740993', // past a double's exact integers
  '99999999999999999999999',
  '-1',
  '0',
  '1.5',
  '1e3',
  'NaN',
  'Infinity',
  'abc',
  '%00',
  '1%00',
  '%ED%A0%80', // a lone surrogate, UTF-8 encoded (not valid UTF-8)
  '%F0%28%8C%28', // invalid UTF-8
  '9'.repeat(400),
  '__proto__',
  '0000-01-01',
  '275760-09-13',
];

/** Query values no route may choke on. */
export const BAD_QUERY_VALUES = [
  '2147483648',
  '-5',
  '%00',
  'a%00b',
  '%ED%A0%80',
  '0000-01-01',
  '0001-01-01',
  '9999-12-31',
  '275760-09-13',
  '2026-02-30',
  '2026-11-01T00:00:00Z',
  '0000-01-01T00:00:00Z',
  '+275760-09-13T00:00:00Z',
  'x'.repeat(5000),
];

/** Keys the routes' queries use; each is tried with every bad value, alone and doubled. */
export const QUERY_KEYS = [
  'farmId',
  'houseId',
  'from',
  'to',
  'window',
  'status',
  'kind',
  'state',
  'assigneeId',
  'exceptionId',
  'isOverdue',
  'day',
];

function deepArray(depth: number): string {
  return `${'['.repeat(depth)}${']'.repeat(depth)}`;
}

function deepObject(depth: number): string {
  return `${'{"a":'.repeat(depth)}1${'}'.repeat(depth)}`;
}

/** Raw JSON bodies (sent as application/json). */
export const BAD_RAW_BODIES: { name: string; text: string }[] = [
  { name: 'cut JSON', text: '{"name": "x' },
  { name: 'null', text: 'null' },
  { name: 'a number', text: '12' },
  { name: 'a string', text: '"text"' },
  { name: 'an array', text: '[1,2,3]' },
  { name: 'nested 5,000 arrays', text: deepArray(5000) },
  { name: 'nested 2,000 objects', text: deepObject(2000) },
  { name: 'prototype key', text: '{"__proto__":{"isAdmin":true},"name":"x"}' },
  { name: 'constructor key', text: '{"constructor":{"prototype":{"x":1}}}' },
  { name: 'NUL in a value', text: '{"name":"a\\u0000b","email":"a\\u0000@x.test"}' },
  { name: 'lone surrogate', text: '{"name":"\\ud800","note":"\\udfff"}' },
  { name: 'NUL in a key', text: '{"na\\u0000me":"x"}' },
  { name: 'huge string', text: JSON.stringify({ name: 'x'.repeat(900_000) }) },
  { name: 'huge number', text: '{"houseId":1e308,"farmId":2147483648,"rows":-1}' },
  {
    name: 'many keys',
    text: JSON.stringify(
      Object.fromEntries(Array.from({ length: 20_000 }, (_, i) => [`k${i}`, i])),
    ),
  },
];

/** Values tried in every field a route's body schema names. */
export const BAD_FIELD_VALUES: unknown[] = [
  '\u0000',
  'ok\u0000ok',
  '\ud800',
  2 ** 31,
  2 ** 53 + 2,
  -1,
  1e308,
  0.5,
  '',
  'x'.repeat(100_000),
  [],
  {},
  true,
  null,
  '0000-01-01',
  '9999-99-99',
  '275760-09-13T00:00:00Z',
  { __proto__: null, nested: { deeper: ['\u0000'] } },
];

/** Seeded, bounded random JSON values (fast-check): the same values on every run. */
export function randomBodies(seed: number, count: number): unknown[] {
  return fc.sample(
    fc.oneof(
      fc.jsonValue({ maxDepth: 4 }),
      fc.dictionary(
        fc.constantFrom(
          'name',
          'houseId',
          'farmId',
          'rows',
          'tiers',
          'email',
          'password',
          'reason',
          'memberships',
          'mapping',
          'title',
          'dueOn',
          'priority',
          'placedOn',
          'hensHoused',
          'readings',
        ),
        fc.oneof(fc.jsonValue({ maxDepth: 2 }), fc.string({ unit: 'binary' })),
      ),
    ),
    { seed, numRuns: count },
  );
}
