import { describe, expect, it } from 'vitest';
import { csvCell, toCsv } from './csv';

describe('csvCell (RFC 4180 §2 rules 6 and 7)', () => {
  it('quotes fields holding a comma, a quote or a line break, doubling inner quotes', () => {
    expect(csvCell('plain')).toBe('plain');
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell('two\nlines')).toBe('"two\nlines"');
    expect(csvCell('cr\r\nlf')).toBe('"cr\r\nlf"');
  });

  it('writes numbers, booleans and empties as they are', () => {
    expect(csvCell(-12.5)).toBe('-12.5');
    expect(csvCell(true)).toBe('true');
    expect(csvCell(null)).toBe('');
    expect(csvCell(undefined)).toBe('');
  });

  // OWASP "CSV Injection": prefix cells starting with = + - @ (and tab, CR) so they are read as text.
  it('defuses text that a spreadsheet would run as a formula', () => {
    expect(csvCell('=1+1')).toBe("'=1+1");
    expect(csvCell('+SUM(A1)')).toBe("'+SUM(A1)");
    expect(csvCell('-2+3')).toBe("'-2+3");
    expect(csvCell('@cmd')).toBe("'@cmd");
    expect(csvCell('\t=x')).toBe("'\t=x");
    expect(csvCell('=HYPERLINK("http://x","y")')).toBe(`"'=HYPERLINK(""http://x"",""y"")"`);
  });
});

describe('toCsv', () => {
  it('ends every line with CRLF', () => {
    expect(toCsv(['a', 'b'], [[1, 'x,y']])).toBe('a,b\r\n1,"x,y"\r\n');
  });
});
