/**
 * How a mapping's columns are found in a file and how each line becomes readings, apart from storage: the
 * runner (import-runner.ts) streams the file and saves; this reads.
 */
import type { Readable } from 'node:stream';
import type { ImportMapping } from '@tierscope/contracts';
import { parseCount, parseTimestamp, type DecimalMark } from '@tierscope/domain';
import type { houseCounters } from './imports.repository';

/** A mapping problem that stops the whole import (a column that is not in the file, say). */
export class MappingProblem extends Error {}

/** A line the import could not take, with its line number and column. */
export interface LineError {
  line: number;
  column: string | null;
  message: string;
}

/** The first 64 KB of a file, to detect its delimiter. */
export async function readSample(stream: Readable): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) {
    chunks.push(chunk as Buffer);
  }
  return Buffer.concat(chunks).toString('utf8');
}

export type Counters = Awaited<ReturnType<typeof houseCounters>>;

export interface Resolved {
  names: string[];
  timestamp: number;
  eggs: number | null;
  counter: number | null;
  row: number | null;
  tier: number | null;
  wide: { index: number; counterId: number }[];
}

export function resolveColumns(
  mapping: ImportMapping,
  header: string[] | null,
  counters: Counters,
): Resolved {
  const names = header?.map((h) => h.trim()) ?? [];
  const find = (ref: string | number, what: string): number => {
    if (typeof ref === 'number') return ref - 1;
    if (!header)
      throw new MappingProblem(`The file has no header line, so ${what} must be a column number`);
    const index = names.findIndex((n) => n.toLowerCase() === ref.toLowerCase());
    if (index < 0)
      throw new MappingProblem(
        `The ${what} column "${ref}" is not in the header (${names.join(', ')})`,
      );
    return index;
  };
  if (mapping.layout === 'long') {
    return {
      names,
      timestamp: find(mapping.timestamp, 'timestamp'),
      eggs: find(mapping.eggs, 'count'),
      counter: mapping.counter !== undefined ? find(mapping.counter, 'counter') : null,
      row: mapping.row !== undefined ? find(mapping.row, 'row') : null,
      tier: mapping.tier !== undefined ? find(mapping.tier, 'tier') : null,
      wide: [],
    };
  }
  return {
    names,
    timestamp: find(mapping.timestamp, 'timestamp'),
    eggs: null,
    counter: null,
    row: null,
    tier: null,
    wide: mapping.columns.map((c) => {
      const counterId =
        c.counter !== undefined
          ? counters.byExternalId.get(c.counter)
          : counters.bySection.get(`${c.row ?? 0}:${c.tier ?? 0}`);
      if (counterId === undefined) {
        throw new MappingProblem(
          c.counter !== undefined
            ? `Counter "${c.counter}" is not a counter of this house`
            : `Row ${c.row ?? '?'}, tier ${c.tier ?? '?'} is not a section of this house`,
        );
      }
      return { index: find(c.column, 'count'), counterId };
    }),
  };
}

export interface Reading {
  counterId: number;
  ts: Date;
  value: number;
  column: string | null;
}

/** The readings of one line, or its errors (reported, never thrown). */
export function readingsOf(
  record: string[],
  line: number,
  columns: Resolved,
  mapping: ImportMapping,
  decimal: DecimalMark,
  counters: Counters,
  addError: (e: LineError) => void,
): Reading[] {
  const name = (index: number) => columns.names[index] ?? `column ${index + 1}`;
  const cell = (index: number) => record[index];
  const tsCell = cell(columns.timestamp);
  if (tsCell === undefined) {
    addError({
      line,
      column: name(columns.timestamp),
      message: `the line has only ${record.length} columns`,
    });
    return [];
  }
  const ts = parseTimestamp(tsCell, mapping.timestampFormat, mapping.timezone);
  if (!ts.ok) {
    addError({ line, column: name(columns.timestamp), message: ts.message });
    return [];
  }
  if (ts.value.getTime() > Date.now() + 5 * 60_000) {
    addError({ line, column: name(columns.timestamp), message: `${tsCell} is in the future` });
    return [];
  }
  if (mapping.layout === 'wide') {
    const out: Reading[] = [];
    for (const c of columns.wide) {
      const text = cell(c.index);
      if (text === undefined || text.trim() === '') continue; // no count for this counter at this time
      const count = parseCount(text, decimal);
      if (!count.ok) {
        addError({ line, column: name(c.index), message: count.message });
        continue;
      }
      out.push({ counterId: c.counterId, ts: ts.value, value: count.value, column: name(c.index) });
    }
    return out;
  }
  let counterId: number | undefined;
  if (columns.counter !== null) {
    const id = cell(columns.counter)?.trim() ?? '';
    counterId = counters.byExternalId.get(id);
    if (counterId === undefined) {
      addError({
        line,
        column: name(columns.counter),
        message: `"${id}" is not a counter of this house`,
      });
      return [];
    }
  } else if (columns.row !== null && columns.tier !== null) {
    const row = Number(cell(columns.row)?.trim());
    const tier = Number(cell(columns.tier)?.trim());
    counterId = counters.bySection.get(`${row}:${tier}`);
    if (counterId === undefined) {
      addError({
        line,
        column: `${name(columns.row)}/${name(columns.tier)}`,
        message: `row ${cell(columns.row) ?? '?'}, tier ${cell(columns.tier) ?? '?'} is not a section of this house`,
      });
      return [];
    }
  }
  if (counterId === undefined || columns.eggs === null) return [];
  const eggsCell = cell(columns.eggs);
  const count = parseCount(eggsCell ?? '', decimal);
  if (!count.ok) {
    addError({ line, column: name(columns.eggs), message: count.message });
    return [];
  }
  return [{ counterId, ts: ts.value, value: count.value, column: name(columns.eggs) }];
}
