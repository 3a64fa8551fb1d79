import { importMappingSchema, type ImportMapping } from '@tierscope/contracts';
import { previewCsv } from './csv-preview';
import {
  columnsOf,
  formOfMapping,
  guessesFor,
  mappingOf,
  roleOfColumn,
  type MappingFormValue,
} from './import-mapping-form';

const longFile = 'Time;Row;Tier;Eggs\r\n01.09.2026 04:00;1;1;46,0\r\n13.09.2026 05:00;1;2;47,0\r\n';
const wideFile = 'timestamp,B-1-1,B-1-2,note\n2026-09-01T04:00:00Z,40,41,x\n';

/** The form after a saved mapping was applied, as the page does it. */
function formFor(mapping: ImportMapping, columns: ReturnType<typeof columnsOf>): MappingFormValue {
  const { wide, ...values } = formOfMapping(mapping, columns);
  return { ...values, wide: wide ?? [] };
}

describe('the import mapping form', () => {
  it('names columns by header, or by number when the file has none', () => {
    const preview = previewCsv(longFile, true);
    expect(columnsOf(preview, true).map((c) => c.ref)).toEqual(['Time', 'Row', 'Tier', 'Eggs']);
    expect(columnsOf(preview, false).map((c) => [c.ref, c.label])).toEqual([
      [1, 'Column 1'],
      [2, 'Column 2'],
      [3, 'Column 3'],
      [4, 'Column 4'],
    ]);
    expect(columnsOf(null, true)).toEqual([]);
  });

  it('guesses a long file from its header and cells, and a wide one from the house’s counters', () => {
    const long = guessesFor(previewCsv(longFile, true), 'Europe/Amsterdam', new Set());
    expect(long).toMatchObject({
      decimal: ',',
      timestampFormat: 'dmy',
      timestamp: 'Time',
      row: 'Row',
      tier: 'Tier',
      eggs: 'Eggs',
      sectionBy: 'rowTier',
      layout: null,
    });
    const wide = guessesFor(previewCsv(wideFile, true), 'UTC', new Set(['B-1-1', 'B-1-2']));
    expect(wide.layout).toBe('wide');
    expect(wide.wide).toEqual(['skip', 'counter:B-1-1', 'counter:B-1-2', 'skip']);
  });

  it('round-trips a saved long mapping through the form, and the API accepts it', () => {
    const columns = columnsOf(previewCsv(longFile, true), true);
    const saved = importMappingSchema.parse({
      layout: 'long',
      delimiter: ';',
      decimal: ',',
      timestamp: 'Time',
      timestampFormat: 'dmy',
      timezone: 'Europe/Amsterdam',
      row: 'Row',
      tier: 'Tier',
      eggs: 'Eggs',
    });
    const mapping = mappingOf(formFor(saved, columns), columns);
    expect(importMappingSchema.parse(mapping)).toEqual(saved);
  });

  it('round-trips a saved wide mapping laid over the file’s columns', () => {
    const columns = columnsOf(previewCsv(wideFile, true), true);
    const saved = importMappingSchema.parse({
      layout: 'wide',
      timestamp: 'timestamp',
      timezone: 'UTC',
      mode: 'total',
      columns: [
        { column: 'B-1-1', counter: 'B-1-1' },
        { column: 'B-1-2', row: 1, tier: 2 },
      ],
    });
    const form = formFor(saved, columns);
    expect(form.wide).toEqual(['skip', 'counter:B-1-1', 'section:1:2', 'skip']);
    expect(importMappingSchema.parse(mappingOf(form, columns))).toEqual(saved);
    // The preview's chips say where each column goes.
    expect(columns.map((_, i) => roleOfColumn(form, columns, i))).toEqual([
      'time',
      'B-1-1',
      'row 1, tier 2',
      null,
    ]);
  });

  it('leaves a half-filled form for the schema to refuse, naming the field', () => {
    const columns = columnsOf(previewCsv(longFile, true), true);
    const form: MappingFormValue = {
      ...formFor(
        importMappingSchema.parse({
          layout: 'long',
          timestamp: 'Time',
          timezone: 'UTC',
          counter: 'Row',
          eggs: 'Eggs',
        }),
        columns,
      ),
      eggs: null,
    };
    const checked = importMappingSchema.safeParse(mappingOf(form, columns));
    expect(checked.success).toBe(false);
    expect(checked.error?.issues.map((i) => i.path.join('.'))).toContain('eggs');
  });
});
