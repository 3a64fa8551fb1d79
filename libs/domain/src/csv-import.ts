/**
 * The judgement of a historical import, line by line: which delimiter a file uses, what a count and a
 * timestamp say, and which counter a line belongs to. Pure functions; the API streams the file through
 * csv-parse and applies these to each record.
 */
import { localParts } from './production-day';

export const DELIMITERS = [',', ';', '\t'] as const;
export type Delimiter = (typeof DELIMITERS)[number];
export const DECIMAL_MARKS = ['.', ','] as const;
export type DecimalMark = (typeof DECIMAL_MARKS)[number];
/**
 * Every line end ends a line, even in a file that mixes them: guessing one from the first line would fold
 * the lines with the other ending into a field and lose their readings without a word.
 */
export const LINE_ENDINGS = ['\r\n', '\n', '\r'];
export const TIMESTAMP_FORMATS = ['iso', 'dmy', 'mdy', 'ymd'] as const;
export type TimestampFormat = (typeof TIMESTAMP_FORMATS)[number];

/** Occurrences of `ch` in a line outside double-quoted fields. */
function countOutsideQuotes(line: string, ch: string): number {
  let inQuotes = false;
  let n = 0;
  for (const c of line) {
    if (c === '"') inQuotes = !inQuotes;
    else if (c === ch && !inQuotes) n += 1;
  }
  return n;
}

/**
 * The delimiter of a CSV sample: the candidate found the same number of times (at least once) on every
 * one of the first lines, preferring the one found most; comma when nothing fits.
 */
export function detectDelimiter(sample: string): Delimiter {
  const lines = sample
    .replace(/^\uFEFF/, '')
    .split(/\r?\n/)
    .filter((l) => l.trim() !== '')
    .slice(0, 10);
  // The last line of a sample may be cut short; judge it only when it is the only one.
  const judged = lines.length > 1 ? lines.slice(0, -1) : lines;
  let best: Delimiter = ',';
  let bestCount = 0;
  for (const d of DELIMITERS) {
    const counts = judged.map((l) => countOutsideQuotes(l, d));
    const first = counts[0] ?? 0;
    if (first > 0 && counts.every((c) => c === first) && first > bestCount) {
      best = d;
      bestCount = first;
    }
  }
  return best;
}

/** The decimal mark of sample count cells: a comma when some look like "12,0" and none like "12.5". */
export function detectDecimalMark(cells: readonly string[], delimiter: Delimiter): DecimalMark {
  if (delimiter === ',') return '.';
  const hasCommaDecimal = cells.some((c) => /^\s*-?\d+,\d+\s*$/.test(c));
  const hasDotDecimal = cells.some((c) => /^\s*-?\d+\.\d{1,2}\s*$/.test(c));
  return hasCommaDecimal && !hasDotDecimal ? ',' : '.';
}

export type Parsed<T> = { ok: true; value: T } | { ok: false; message: string };

/**
 * A count of eggs from a cell: a whole number, not negative, with the other mark read as a thousands
 * separator ("1.234" is 1234 when the decimal mark is a comma) and a zero fraction allowed ("12,0").
 */
export function parseCount(cell: string, decimal: DecimalMark): Parsed<number> {
  const text = cell.trim().replace(/[\s\u00a0']/g, '');
  if (text === '') return { ok: false, message: 'is empty' };
  const thousands = decimal === '.' ? ',' : '.';
  const plain = text.split(thousands).join('').replace(decimal, '.');
  if (!/^-?\d+(\.\d+)?$/.test(plain)) return { ok: false, message: `"${cell}" is not a number` };
  const value = Number(plain);
  if (!Number.isInteger(value))
    return { ok: false, message: `${cell} is not a whole number of eggs` };
  if (value < 0) return { ok: false, message: `${cell} is negative` };
  if (value > 2_000_000_000) return { ok: false, message: `${cell} is too large` };
  return { ok: true, value };
}

const offsetCache = new Map<string, number>();

/** Minutes the zone is ahead of UTC at an instant (cached per zone and UTC hour: offsets change on the hour). */
function zoneOffsetMinutes(utcMs: number, timeZone: string): number {
  const hour = Math.floor(utcMs / 3_600_000);
  const key = `${timeZone}|${hour}`;
  const cached = offsetCache.get(key);
  if (cached !== undefined) return cached;
  const at = hour * 3_600_000;
  const local = localParts(new Date(at), timeZone);
  const shown = Date.UTC(local.year, local.month - 1, local.day, local.hour, local.minute);
  const offset = Math.round((shown - at) / 60_000);
  if (offsetCache.size > 100_000) offsetCache.clear();
  offsetCache.set(key, offset);
  return offset;
}

/**
 * The instant a wall-clock time in `timeZone` names. In the hour skipped when clocks go forward the
 * time is read with the offset from before the change; in the hour repeated when they go back, the
 * first of the two instants is taken.
 */
export function wallTimeToInstant(
  wall: { year: number; month: number; day: number; hour: number; minute: number; second: number },
  timeZone: string,
): Date {
  const asUtc = Date.UTC(wall.year, wall.month - 1, wall.day, wall.hour, wall.minute, wall.second);
  // The offsets a day either side: a clock change in between is the only way the two differ.
  const before = zoneOffsetMinutes(asUtc - 24 * 3_600_000, timeZone);
  const after = zoneOffsetMinutes(asUtc + 24 * 3_600_000, timeZone);
  const valid = [before, after]
    .map((offset) => ({ offset, instant: asUtc - offset * 60_000 }))
    .filter((c) => zoneOffsetMinutes(c.instant, timeZone) === c.offset)
    .map((c) => c.instant);
  if (valid.length === 0) return new Date(asUtc - before * 60_000);
  return new Date(Math.min(...valid));
}

const ISO =
  /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;
const DAY_FIRST = /^(\d{1,2})[./-](\d{1,2})[./-](\d{4})[ T]+(\d{1,2}):(\d{2})(?::(\d{2}))?$/;
const YEAR_FIRST = /^(\d{4})[./-](\d{1,2})[./-](\d{1,2})[ T]+(\d{1,2}):(\d{2})(?::(\d{2}))?$/;

/**
 * A timestamp cell as an instant. ISO-8601 with an offset (or Z) is exact; any time without an offset is
 * a wall-clock time in `timeZone`. Day-first (dmy), month-first (mdy) and year-first (ymd) dates take
 * / . or - between parts, then the time.
 */
export function parseTimestamp(
  cell: string,
  format: TimestampFormat,
  timeZone: string,
): Parsed<Date> {
  const text = cell.trim();
  let wall: {
    year: number;
    month: number;
    day: number;
    hour: number;
    minute: number;
    second: number;
  };
  let offset: string | undefined;
  if (format === 'iso') {
    const m = ISO.exec(text);
    if (!m)
      return {
        ok: false,
        message: `"${cell}" is not an ISO-8601 time (2026-03-08T04:15:00-06:00)`,
      };
    wall = {
      year: Number(m[1]),
      month: Number(m[2]),
      day: Number(m[3]),
      hour: Number(m[4]),
      minute: Number(m[5]),
      second: Number(m[6] ?? 0),
    };
    offset = m[7];
  } else {
    const m = (format === 'ymd' ? YEAR_FIRST : DAY_FIRST).exec(text);
    const example = { dmy: '31/12/2026 04:15', mdy: '12/31/2026 04:15', ymd: '2026-12-31 04:15' }[
      format
    ];
    if (!m) return { ok: false, message: `"${cell}" is not a time like ${example}` };
    const [a, b, c] = [Number(m[1]), Number(m[2]), Number(m[3])];
    const [year, month, day] =
      format === 'ymd' ? [a, b, c] : format === 'dmy' ? [c, b, a] : [c, a, b];
    wall = {
      year,
      month,
      day,
      hour: Number(m[4]),
      minute: Number(m[5]),
      second: Number(m[6] ?? 0),
    };
  }
  const probe = new Date(Date.UTC(wall.year, wall.month - 1, wall.day));
  if (
    wall.month < 1 ||
    wall.month > 12 ||
    probe.getUTCDate() !== wall.day ||
    probe.getUTCMonth() !== wall.month - 1 ||
    wall.hour > 23 ||
    wall.minute > 59 ||
    wall.second > 59
  ) {
    return { ok: false, message: `"${cell}" is not a real date and time` };
  }
  if (offset !== undefined) {
    const minutes =
      offset.toUpperCase() === 'Z'
        ? 0
        : (offset.startsWith('-') ? -1 : 1) *
          (Number(offset.slice(1, 3)) * 60 + Number(offset.slice(-2)));
    const utc =
      Date.UTC(wall.year, wall.month - 1, wall.day, wall.hour, wall.minute, wall.second) -
      minutes * 60_000;
    return { ok: true, value: new Date(utc) };
  }
  return { ok: true, value: wallTimeToInstant(wall, timeZone) };
}

/** Where an import is, from upload to its end. */
export const IMPORT_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type ImportState = (typeof IMPORT_STATES)[number];
