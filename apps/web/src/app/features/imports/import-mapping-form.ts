import type { ColumnRef, ImportMapping, ImportMappingInput } from '@tierscope/contracts';
import type { DecimalMark, Delimiter, TimestampFormat } from '@tierscope/domain';
import { guessLongMapping, guessTimestampFormat, type CsvPreview } from './csv-preview';

/**
 * The imports page's mapping form as plain values, and the pure steps between it and the mapping the API
 * takes: no Angular here, so each step has a spec (import-mapping-form.spec.ts).
 */
export interface MappingFormValue {
  layout: ImportMapping['layout'];
  delimiter: Delimiter | 'auto';
  decimal: DecimalMark;
  hasHeader: boolean;
  timestamp: ColumnRef | null;
  timestampFormat: TimestampFormat;
  timezone: string;
  /** a long file names its section by a counter column, or by a row and a tier column */
  sectionBy: 'rowTier' | 'counter';
  counter: ColumnRef | null;
  row: ColumnRef | null;
  tier: ColumnRef | null;
  eggs: ColumnRef | null;
  mode: ImportMapping['mode'];
  /** a wide file's columns in order: `skip`, `counter:<id>` or `section:<row>:<tier>` */
  wide: string[];
}

/** A file column as the mapping names it, and as the form shows it. */
export interface FileColumn {
  ref: ColumnRef;
  label: string;
}

type WideColumn = Extract<ImportMappingInput, { layout: 'wide' }>['columns'][number];

/** The file's columns as the mapping names them: by header name, or by number without a header. */
export function columnsOf(preview: CsvPreview | null, hasHeader: boolean): FileColumn[] {
  if (!preview) return [];
  return Array.from({ length: preview.columnCount }, (_, i): FileColumn => {
    const name = preview.firstLine[i]?.trim() ?? '';
    return hasHeader && name !== ''
      ? { ref: name, label: name }
      : { ref: i + 1, label: `Column ${i + 1}` };
  });
}

/** The mapping as the API takes it, from the form. */
export function mappingOf(v: MappingFormValue, columns: readonly FileColumn[]): ImportMappingInput {
  const common = {
    ...(v.delimiter === 'auto' ? {} : { delimiter: v.delimiter }),
    decimal: v.decimal,
    hasHeader: v.hasHeader,
    timestamp: v.timestamp ?? '',
    timestampFormat: v.timestampFormat,
    timezone: v.timezone,
    mode: v.mode,
  };
  if (v.layout === 'wide') {
    return {
      layout: 'wide',
      ...common,
      columns: v.wide.flatMap((target, i): WideColumn[] => {
        const ref = columns[i]?.ref;
        if (target === 'skip' || ref === undefined) return [];
        if (target.startsWith('counter:')) return [{ column: ref, counter: target.slice(8) }];
        const [, row = 0, tier = 0] = target.split(':').map(Number);
        return [{ column: ref, row, tier }];
      }),
    };
  }
  return {
    layout: 'long',
    ...common,
    eggs: v.eggs ?? '',
    ...(v.sectionBy === 'counter'
      ? { counter: v.counter ?? '' }
      : { row: v.row ?? '', tier: v.tier ?? '' }),
  };
}

/** The form's values for a saved mapping, its wide targets laid over the file's columns. */
export function formOfMapping(
  m: ImportMapping,
  columns: readonly FileColumn[],
): Omit<MappingFormValue, 'wide'> & { wide: string[] | null } {
  const common = {
    layout: m.layout,
    delimiter: m.delimiter ?? 'auto',
    decimal: m.decimal,
    hasHeader: m.hasHeader,
    timestamp: m.timestamp,
    timestampFormat: m.timestampFormat,
    timezone: m.timezone,
    mode: m.mode,
  } as const;
  if (m.layout === 'long') {
    return {
      ...common,
      sectionBy: m.counter !== undefined ? 'counter' : 'rowTier',
      counter: m.counter ?? null,
      row: m.row ?? null,
      tier: m.tier ?? null,
      eggs: m.eggs,
      wide: null,
    };
  }
  const byColumn = new Map(
    m.columns.map((col) => [
      String(col.column),
      col.counter !== undefined
        ? `counter:${col.counter}`
        : `section:${col.row ?? 0}:${col.tier ?? 0}`,
    ]),
  );
  return {
    ...common,
    sectionBy: 'rowTier',
    counter: null,
    row: null,
    tier: null,
    eggs: null,
    wide: columns.map((column) => byColumn.get(String(column.ref)) ?? 'skip'),
  };
}

/**
 * A first guess from a new preview: its decimal mark and time format, the long layout's columns by their
 * header names, and — when at least two header names are counters of the house — the wide layout.
 */
export function guessesFor(
  p: CsvPreview,
  timezone: string,
  knownCounters: ReadonlySet<string>,
): Pick<
  MappingFormValue,
  | 'decimal'
  | 'timestampFormat'
  | 'timestamp'
  | 'eggs'
  | 'row'
  | 'tier'
  | 'counter'
  | 'sectionBy'
  | 'wide'
> & { layout: 'wide' | null } {
  const guess = guessLongMapping(p.firstLine, timezone);
  const tsIndex = typeof guess.timestamp === 'string' ? p.firstLine.indexOf(guess.timestamp) : 0;
  const wide = p.firstLine.map((name) =>
    knownCounters.has(name.trim()) ? `counter:${name.trim()}` : 'skip',
  );
  return {
    decimal: p.decimal,
    timestampFormat: guessTimestampFormat(p.lines.map((l) => l[tsIndex] ?? '')),
    timestamp: guess.timestamp ?? null,
    eggs: guess.eggs ?? null,
    row: guess.row ?? null,
    tier: guess.tier ?? null,
    counter: guess.counter ?? null,
    sectionBy: guess.counter !== undefined ? 'counter' : 'rowTier',
    wide,
    layout: wide.filter((w) => w !== 'skip').length >= 2 ? 'wide' : null,
  };
}

/** Where a column goes, for the preview's header chips. */
export function roleOfColumn(
  v: MappingFormValue,
  columns: readonly FileColumn[],
  index: number,
): string | null {
  const ref = columns[index]?.ref;
  if (ref === undefined) return null;
  if (v.timestamp === ref) return 'time';
  if (v.layout === 'wide') {
    const target = v.wide[index];
    if (!target || target === 'skip') return null;
    if (target.startsWith('counter:')) return target.slice(8);
    const [, row, tier] = target.split(':');
    return `row ${row}, tier ${tier}`;
  }
  if (v.eggs === ref) return v.mode === 'total' ? 'total' : 'eggs';
  if (v.sectionBy === 'counter' && v.counter === ref) return 'counter';
  if (v.sectionBy === 'rowTier' && v.row === ref) return 'row';
  if (v.sectionBy === 'rowTier' && v.tier === ref) return 'tier';
  return null;
}
