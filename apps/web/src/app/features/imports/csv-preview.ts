import type { ImportMappingInput } from '@tierscope/contracts';
import {
  detectDecimalMark,
  detectDelimiter,
  LINE_ENDINGS,
  type DecimalMark,
  type Delimiter,
  type TimestampFormat,
} from '@tierscope/domain';
import { parse } from 'csv-parse/browser/esm/sync';

export interface CsvPreview {
  delimiter: Delimiter;
  decimal: DecimalMark;
  /** the first line's cells (used as column names when the file has a header) */
  firstLine: string[];
  /** up to 10 lines after the first */
  lines: string[][];
  columnCount: number;
}

/** The first lines of a file as the importer will read them, from a sample of its start. */
export function previewCsv(
  sample: string,
  isWholeFile: boolean,
  delimiter?: Delimiter,
): CsvPreview {
  const used = delimiter ?? detectDelimiter(sample);
  // A sample cut mid-line would show a broken last line: drop it unless this is the whole file.
  const text = isWholeFile
    ? sample
    : sample.slice(0, Math.max(0, sample.lastIndexOf('\n'))).replace(/\r$/, '');
  const records: string[][] = parse(text, {
    delimiter: used,
    record_delimiter: LINE_ENDINGS,
    bom: true,
    relax_column_count: true,
    relax_quotes: true,
    skip_empty_lines: true,
    to_line: 40,
  });
  const [firstLine = [], ...rest] = records;
  const lines = rest.slice(0, 10);
  const columnCount = Math.max(firstLine.length, ...lines.map((l) => l.length));
  const cells = lines.flatMap((l) => l);
  return {
    delimiter: used,
    decimal: detectDecimalMark(cells, used),
    firstLine,
    lines,
    columnCount,
  };
}

const GUESSES: { role: 'timestamp' | 'row' | 'tier' | 'counter' | 'eggs'; pattern: RegExp }[] = [
  { role: 'timestamp', pattern: /^(time|timestamp|ts|date|datetime|date ?time|zeit|datum|when)$/i },
  { role: 'row', pattern: /^(row|rij|reihe|line)$/i },
  { role: 'tier', pattern: /^(tier|level|etage|floor)$/i },
  { role: 'counter', pattern: /^(counter|counter ?id|sensor|device|id|zähler)$/i },
  { role: 'eggs', pattern: /^(eggs|count|eieren|eier|total|value|n)$/i },
];

/** A first guess at a long-layout mapping from the column names; the user checks and corrects it. */
export function guessLongMapping(
  header: readonly string[],
  timezone: string,
): Partial<Extract<ImportMappingInput, { layout: 'long' }>> {
  const found: Partial<Record<(typeof GUESSES)[number]['role'], string>> = {};
  for (const name of header) {
    const guess = GUESSES.find((g) => g.pattern.test(name.trim()));
    if (guess && found[guess.role] === undefined) found[guess.role] = name;
  }
  return {
    layout: 'long',
    timezone,
    ...(found.timestamp ? { timestamp: found.timestamp } : {}),
    ...(found.eggs ? { eggs: found.eggs } : {}),
    ...(found.row && found.tier ? { row: found.row, tier: found.tier } : {}),
    ...(found.counter && !(found.row && found.tier) ? { counter: found.counter } : {}),
  };
}

/** The date order of sample timestamps: ISO when they start with a year, else day-first unless a month > 12 appears first. */
export function guessTimestampFormat(cells: readonly string[]): TimestampFormat {
  const sample = cells.filter((c) => c.trim() !== '').slice(0, 20);
  if (sample.every((c) => /^\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}/.test(c.trim()))) return 'iso';
  if (sample.every((c) => /^\d{4}[./-]\d{1,2}[./-]\d{1,2}/.test(c.trim()))) return 'ymd';
  const firsts = sample.map((c) => Number(/^(\d{1,2})[./-](\d{1,2})/.exec(c.trim())?.[1] ?? 0));
  const seconds = sample.map((c) => Number(/^(\d{1,2})[./-](\d{1,2})/.exec(c.trim())?.[2] ?? 0));
  if (seconds.some((n) => n > 12)) return 'mdy';
  if (firsts.some((n) => n > 12)) return 'dmy';
  return 'dmy';
}
