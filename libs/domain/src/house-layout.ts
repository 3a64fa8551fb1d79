/** Largest aviary we model; a real house has a handful of rows and at most four tiers (EU 1999/74/EC Art. 4). */
export const MAX_ROWS = 60;
export const MAX_TIERS = 4;

export interface SectionPosition {
  readonly row: number;
  readonly tier: number;
}

/** Every (row, tier) cell of a house, rows first, tiers from the floor up — both numbered from 1. */
export function sectionPositions(rows: number, tiers: number): SectionPosition[] {
  if (!Number.isInteger(rows) || rows < 1 || rows > MAX_ROWS) {
    throw new RangeError(`rows must be a whole number from 1 to ${MAX_ROWS}`);
  }
  if (!Number.isInteger(tiers) || tiers < 1 || tiers > MAX_TIERS) {
    throw new RangeError(`tiers must be a whole number from 1 to ${MAX_TIERS}`);
  }
  const positions: SectionPosition[] = [];
  for (let row = 1; row <= rows; row++) {
    for (let tier = 1; tier <= tiers; tier++) positions.push({ row, tier });
  }
  return positions;
}

/**
 * The counter ids a new house starts with. Integrators re-map them to what their controller exports;
 * until then they are unique per farm because they carry the house id.
 */
export function defaultBeltCounterId(houseId: number, position: SectionPosition): string {
  return `H${houseId}-R${position.row}-T${position.tier}`;
}

export function defaultCollectorCounterId(houseId: number): string {
  return `H${houseId}-COLLECTOR`;
}

/** A belt counter counts one section's egg belt; the collector counts the whole house. */
export const COUNTER_KINDS = ['belt', 'collector'] as const;
export type CounterKind = (typeof COUNTER_KINDS)[number];
