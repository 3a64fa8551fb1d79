import { guessLongMapping, guessTimestampFormat, previewCsv } from './csv-preview';

describe('previewCsv', () => {
  it('reads the first lines with quoted fields, finding the delimiter and decimal mark', () => {
    const sample =
      'Zeit;Reihe;Etage;Eier;Notiz\r\n01.09.2026 04:00;1;1;46,0;"a; b"\r\n01.09.2026 05:00;1;2;47,0;x\r\n02.09.2026 05:';
    const p = previewCsv(sample, false);
    expect(p.delimiter).toBe(';');
    expect(p.decimal).toBe(',');
    expect(p.firstLine).toEqual(['Zeit', 'Reihe', 'Etage', 'Eier', 'Notiz']);
    // The cut-off last line of the sample is left out.
    expect(p.lines).toEqual([
      ['01.09.2026 04:00', '1', '1', '46,0', 'a; b'],
      ['01.09.2026 05:00', '1', '2', '47,0', 'x'],
    ]);
    expect(p.columnCount).toBe(5);
  });
});

describe('guessLongMapping', () => {
  it('maps columns by their usual names, preferring row and tier to a counter id', () => {
    expect(guessLongMapping(['timestamp', 'row', 'tier', 'eggs', 'counter'], 'UTC')).toEqual({
      layout: 'long',
      timezone: 'UTC',
      timestamp: 'timestamp',
      eggs: 'eggs',
      row: 'row',
      tier: 'tier',
    });
    expect(guessLongMapping(['Time', 'Counter ID', 'Count'], 'UTC')).toMatchObject({
      timestamp: 'Time',
      counter: 'Counter ID',
      eggs: 'Count',
    });
  });
});

describe('guessTimestampFormat', () => {
  it('tells ISO, year-first, month-first and day-first apart from the cells', () => {
    expect(guessTimestampFormat(['2026-09-01T04:00:00Z'])).toBe('iso');
    expect(guessTimestampFormat(['2026/09/01 04:00'])).toBe('ymd');
    expect(guessTimestampFormat(['09/13/2026 04:00'])).toBe('mdy');
    expect(guessTimestampFormat(['13/09/2026 04:00'])).toBe('dmy');
  });
});
