import type { ImportMappingInput } from '@tierscope/contracts';

/**
 * The mapping of a long export — one reading a line, with columns for the time, row, tier and eggs — as the
 * specs, the cluster suite and bench:import upload it.
 */
export function longMapping(
  timezone = 'UTC',
  timestamp = 'timestamp',
): Extract<ImportMappingInput, { layout: 'long' }> {
  return { layout: 'long', timestamp, timezone, row: 'row', tier: 'tier', eggs: 'eggs' };
}

/** An import upload as a browser sends it: the mapping, and the CSV as `export.csv`. */
export function importForm(
  csv: string | Blob,
  mapping: ImportMappingInput = longMapping(),
): FormData {
  const form = new FormData();
  form.set('mapping', JSON.stringify(mapping));
  form.set(
    'file',
    typeof csv === 'string' ? new Blob([csv], { type: 'text/csv' }) : csv,
    'export.csv',
  );
  return form;
}
