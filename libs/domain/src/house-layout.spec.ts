import { describe, expect, it } from 'vitest';
import { defaultBeltCounterId, defaultCollectorCounterId, sectionPositions } from './house-layout';

describe('sectionPositions', () => {
  it('lists every row and tier once, numbered from 1', () => {
    const cells = sectionPositions(6, 3);
    expect(cells).toHaveLength(18);
    expect(cells[0]).toEqual({ row: 1, tier: 1 });
    expect(cells.at(-1)).toEqual({ row: 6, tier: 3 });
    expect(new Set(cells.map((c) => `${c.row}/${c.tier}`)).size).toBe(18);
  });

  it('refuses more than four tiers, the most EU 1999/74/EC Art. 4 allows in one system', () => {
    expect(() => sectionPositions(6, 5)).toThrow(/tiers/);
  });

  it('refuses zero or fractional rows', () => {
    expect(() => sectionPositions(0, 3)).toThrow(/rows/);
    expect(() => sectionPositions(2.5, 3)).toThrow(/rows/);
  });
});

describe('default counter ids', () => {
  it('carry the house id so that two houses of one farm never clash', () => {
    expect(defaultBeltCounterId(7, { row: 2, tier: 3 })).toBe('H7-R2-T3');
    expect(defaultBeltCounterId(8, { row: 2, tier: 3 })).not.toBe(
      defaultBeltCounterId(7, { row: 2, tier: 3 }),
    );
    expect(defaultCollectorCounterId(7)).toBe('H7-COLLECTOR');
  });
});
