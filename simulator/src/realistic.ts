import { DEFAULT_LAY_CURVE, layRate, type LayCurve } from './lay-model';
import { generator, hashSeed } from './random';

/**
 * A house as real counts behave, day by day and 15 minutes at a time — the realistic mode the demo, the
 * integration tests and `npm run bench:detect` use (the tidy Poisson mode of house-model.ts stays for tests
 * that need exact numbers):
 * - binomial counting (a hen lays at most one egg a day) on a lay rate by flock age;
 * - day-to-day section noise (lognormal, σ 2.5 % by default: how many hens choose to nest there today),
 *   a house-wide daily factor on the lay rate (weather, feed);
 * - persistent section differences (end rows and the bottom and top tiers a few per cent low);
 * - lay times after lights-on: a fast rise and a long afternoon tail (a shifted gamma, median ≈ 5 h for white
 *   hens on 16L:8D after Patterson 1997 — TRADE-FACTS §2 [S]/[C]; brown hens 1.3 h earlier — TRADE-FACTS §2 [S]),
 *   each section a little earlier or later (± 15 min) and every day a little different;
 * - optional belt-run schedules (eggs are counted only when the belts run), eggs' transit to the collector,
 *   counter glitches (a dropped slot caught up later, or a double count);
 * - planted faults with realistic shapes, and gateways that deliver late.
 * Everything is drawn from generators seeded by (seed, what, day), so a house-day is the same however often,
 * and in whatever order, it is asked for.
 */

export const SLOT_MINUTES = 15;
export const SLOTS_PER_DAY = (24 * 60) / SLOT_MINUTES;

export type PlantedFault =
  /** a section lays less (drinkers, feeders, nest): shows over about 6 hours */
  | { kind: 'section'; row: number; tier: number; drop: number; onsetSlot: number }
  /** a row's feed line: shows over about a day */
  | { kind: 'row'; row: number; drop: number; onsetSlot: number }
  /** a tier's lighting or feed loop: shows over about 12 hours */
  | { kind: 'tier'; tier: number; drop: number; onsetSlot: number }
  /** a slow water problem: a section lays `perDay` less each day */
  | { kind: 'slide'; row: number; tier: number; perDay: number; onsetSlot: number }
  /** a slow water problem on a whole tier's loop: every section of it lays `perDay` less each day */
  | { kind: 'tier-slide'; tier: number; perDay: number; onsetSlot: number }
  /** a dead belt counter: it counts nothing, the eggs still reach the collector */
  | { kind: 'dead'; row: number; tier: number; onsetSlot: number }
  /** a belt counter that counts `factor` times the eggs */
  | { kind: 'overcount'; row: number; tier: number; factor: number; onsetSlot: number }
  /** the collector counter reads `pct` % off */
  | { kind: 'collector-drift'; pct: number; onsetSlot: number }
  /** the gateway sends nothing for `hours`, then its backlog at once */
  | { kind: 'late-gateway'; hours: number; onsetSlot: number }
  /** not a fault: an end row that always lays `factor` of its peers */
  | { kind: 'end-row'; row: number; factor: number }
  /** not a fault: a section that lays `minutes` later than its peers every day */
  | { kind: 'late-section'; row: number; tier: number; minutes: number };

export interface RealisticHouseOptions {
  rows: number;
  tiers: number;
  seed: number;
  hensPerSection?: number;
  /** hens of one section on a day (mortality); overrides hensPerSection */
  hensOn?: (day: number) => number;
  breed?: 'white' | 'brown';
  photoperiodHours?: number;
  /** σ of the lognormal day-to-day factor of each section */
  sectionNoise?: number;
  /** σ of the lognormal day-to-day factor of the whole house */
  houseNoise?: number;
  /** the flock's age on day 0 */
  startAgeWeeks?: number;
  curve?: LayCurve;
  /** hours after lights-on at which the belts run; eggs are counted then (none: counted as laid) */
  beltRunHours?: readonly number[];
  /** 15-minute slots eggs take from a belt to the collector */
  collectorLagSlots?: number;
  /** chance per counter per day of a glitch */
  glitchesPerCounterDay?: number;
  faults?: readonly PlantedFault[];
}

export interface SimSection {
  row: number;
  tier: number;
  /** eggs the counter reported in each slot of the day (what a gateway sends) */
  counted: Int32Array;
  /** eggs really laid in each slot (what an oracle knows) */
  laid: Int32Array;
  /** eggs the section would have laid that day without any fault, in expectation (what an oracle knows) */
  expectedWithoutFault: number;
}

export interface SimDay {
  day: number;
  sections: SimSection[];
  collector: Int32Array;
  /** eggs on their way to the collector at the day's end (they arrive the next day) */
  collectorCarry?: Int32Array;
}

/** A normal draw (Box–Muller). */
function normal(random: () => number): number {
  const u = Math.max(random(), Number.EPSILON);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

/** A binomial draw: exact by inversion for small means, else the normal approximation, kept in [0, n]. */
export function binomial(n: number, p: number, random: () => number): number {
  if (n <= 0 || p <= 0) return 0;
  if (p >= 1) return n;
  const mean = n * p;
  if (mean < 25 || n - mean < 25) {
    if (p > 0.5) return n - binomial(n, 1 - p, random);
    // Inversion: walk the probabilities up from 0.
    let k = 0;
    let probability = Math.pow(1 - p, n);
    let cumulative = probability;
    const u = random();
    while (u > cumulative && k < n) {
      probability *= ((n - k) / (k + 1)) * (p / (1 - p));
      k += 1;
      cumulative += probability;
    }
    return k;
  }
  const draw = Math.round(mean + Math.sqrt(mean * (1 - p)) * normal(random));
  return Math.min(n, Math.max(0, draw));
}

/** Share of eggs laid by `hours` after lights-on: a gamma(3, θ) shifted by `shift` hours. */
function layCdf(hours: number, shift: number, theta: number): number {
  const x = (hours - shift) / theta;
  if (x <= 0) return 0;
  return 1 - Math.exp(-x) * (1 + x + (x * x) / 2);
}

export class RealisticHouse {
  readonly rows: number;
  readonly tiers: number;
  readonly photoperiodHours: number;
  private readonly options: Required<
    Omit<RealisticHouseOptions, 'beltRunHours' | 'faults' | 'hensOn'>
  > & {
    hensOn: ((day: number) => number) | null;
    beltRunHours: readonly number[] | null;
    faults: readonly PlantedFault[];
  };
  private readonly persistent = new Map<string, { factor: number; offsetHours: number }>();
  private readonly cache = new Map<number, SimDay>();

  constructor(options: RealisticHouseOptions) {
    this.options = {
      hensPerSection: 860,
      breed: 'white',
      photoperiodHours: 16,
      sectionNoise: 0.025,
      houseNoise: 0.01,
      startAgeWeeks: 35,
      curve: DEFAULT_LAY_CURVE,
      collectorLagSlots: 2,
      glitchesPerCounterDay: 0.003,
      ...options,
      hensOn: options.hensOn ?? null,
      beltRunHours: options.beltRunHours ?? null,
      faults: options.faults ?? [],
    };
    this.rows = options.rows;
    this.tiers = options.tiers;
    this.photoperiodHours = this.options.photoperiodHours;
    for (let row = 1; row <= this.rows; row++) {
      for (let tier = 1; tier <= this.tiers; tier++) {
        const random = generator(hashSeed(options.seed, 'persistent', row, tier));
        const endRow = row === 1 || row === this.rows ? 0.97 : 1;
        const tierWeight =
          this.tiers === 1 ? 1 : tier === 1 ? 0.96 : tier === this.tiers ? 0.98 : 1.03;
        let factor = endRow * tierWeight * (0.98 + 0.04 * random());
        let offsetHours = (random() - 0.5) * 0.5;
        for (const f of this.options.faults) {
          if (f.kind === 'end-row' && f.row === row) factor *= f.factor;
          if (f.kind === 'late-section' && f.row === row && f.tier === tier)
            offsetHours += f.minutes / 60;
        }
        this.persistent.set(`${row}:${tier}`, { factor, offsetHours });
      }
    }
  }

  /** Lay curve shape: white hens' median lay ≈ 5 h after lights-on, brown hens 1.3 h earlier. */
  private get layShift(): number {
    return this.options.breed === 'brown' ? -0.3 : 1.0;
  }

  /** A fault's multiplier on laying at an absolute slot (1 = none), with its shape over time. */
  private layFactor(row: number, tier: number, slot: number): number {
    let factor = 1;
    for (const f of this.options.faults) {
      if (!('onsetSlot' in f) || slot < f.onsetSlot) continue;
      const hours = ((slot - f.onsetSlot) * SLOT_MINUTES) / 60;
      const ramp = (over: number) => Math.min(1, hours / over);
      if (f.kind === 'section' && f.row === row && f.tier === tier) factor *= 1 - f.drop * ramp(6);
      if (f.kind === 'row' && f.row === row) factor *= 1 - f.drop * ramp(24);
      if (f.kind === 'tier' && f.tier === tier) factor *= 1 - f.drop * ramp(12);
      if (f.kind === 'slide' && f.row === row && f.tier === tier)
        factor *= Math.max(0.3, 1 - (f.perDay * hours) / 24);
      if (f.kind === 'tier-slide' && f.tier === tier)
        factor *= Math.max(0.3, 1 - (f.perDay * hours) / 24);
    }
    return factor;
  }

  private countFactor(row: number, tier: number, slot: number): number {
    let factor = 1;
    for (const f of this.options.faults) {
      if (!('onsetSlot' in f) || slot < f.onsetSlot) continue;
      if (f.kind === 'dead' && f.row === row && f.tier === tier) factor = 0;
      if (f.kind === 'overcount' && f.row === row && f.tier === tier) factor *= f.factor;
    }
    return factor;
  }

  /** The absolute slot at which a reading made at `slot` reaches the server (a late gateway holds them). */
  arrivalSlot(slot: number): number {
    for (const f of this.options.faults) {
      if (f.kind !== 'late-gateway') continue;
      const end = f.onsetSlot + (f.hours * 60) / SLOT_MINUTES;
      if (slot >= f.onsetSlot && slot < end) return end;
    }
    return slot;
  }

  /** Expected lay rate (eggs per hen) on a day, before noise and faults. */
  layRateOn(day: number): number {
    return layRate(this.options.startAgeWeeks + day / 7, this.options.curve);
  }

  dayData(day: number): SimDay {
    const hit = this.cache.get(day);
    if (hit) return hit;
    const o = this.options;
    const houseRandom = generator(hashSeed(o.seed, 'house', day));
    const houseFactor = Math.exp(
      o.houseNoise * normal(houseRandom) - (o.houseNoise * o.houseNoise) / 2,
    );
    const baseRate = this.layRateOn(day);
    const lightSlots = (o.photoperiodHours * 60) / SLOT_MINUTES;
    const runSlots = o.beltRunHours
      ? new Set(
          o.beltRunHours.map((h) =>
            Math.min(SLOTS_PER_DAY - 1, Math.round((h * 60) / SLOT_MINUTES)),
          ),
        )
      : null;
    const collector = new Int32Array(SLOTS_PER_DAY + o.collectorLagSlots);
    const sections: SimSection[] = [];
    const dayStart = day * SLOTS_PER_DAY;
    const hensPerSection = o.hensOn ? o.hensOn(day) : o.hensPerSection;
    for (let row = 1; row <= this.rows; row++) {
      for (let tier = 1; tier <= this.tiers; tier++) {
        const random = generator(hashSeed(o.seed, 'section', row, tier, day));
        const persistent = this.persistent.get(`${row}:${tier}`) ?? { factor: 1, offsetHours: 0 };
        // Hens choose where to nest: the persistent difference and today's wobble are in how many hens lay
        // here (so a section is never pushed past one egg a hen); weather and feed move the house's rate.
        const noise = Math.exp(
          o.sectionNoise * normal(random) - (o.sectionNoise * o.sectionNoise) / 2,
        );
        const hens = Math.round(hensPerSection * persistent.factor * noise);
        const p = Math.min(0.99, baseRate * houseFactor);
        const expectedWithoutFault = hensPerSection * baseRate * persistent.factor;
        const total = binomial(hens, p, random);
        // Where in the day: the section's own shift plus a few minutes' wobble today.
        const shift = this.layShift + persistent.offsetHours + normal(random) * (5 / 60);
        const laid = new Int32Array(SLOTS_PER_DAY);
        let remaining = total;
        let remainingShare = 1;
        let previousCdf = 0;
        for (let j = 0; j < SLOTS_PER_DAY && remaining > 0; j++) {
          const upper =
            j === lightSlots - 1 ? 1 : layCdf(((j + 1) * SLOT_MINUTES) / 60, shift, 1.5);
          const share = Math.max(0, upper - previousCdf);
          previousCdf = Math.max(previousCdf, upper);
          const draw =
            remainingShare <= 0
              ? remaining
              : binomial(remaining, Math.min(1, share / remainingShare), random);
          remainingShare -= share;
          // A fault thins what is laid in its slots.
          const kept = binomial(draw, this.layFactor(row, tier, dayStart + j), random);
          laid[j] = kept;
          remaining -= draw;
        }
        // A counter fault acts when the eggs pass the counter: as they are laid on running belts, at the run
        // that carries them on scheduled ones (below).
        const countAt = (j: number, eggs: number) => {
          const factor = this.countFactor(row, tier, dayStart + j);
          return factor === 1 ? eggs : Math.round(eggs * factor);
        };
        const counted = new Int32Array(SLOTS_PER_DAY);
        for (let j = 0; j < SLOTS_PER_DAY; j++)
          counted[j] = runSlots ? (laid[j] ?? 0) : countAt(j, laid[j] ?? 0);
        // A glitch: a slot's count is dropped and caught up in the next one, or counted twice.
        if (random() < o.glitchesPerCounterDay) {
          const j = Math.floor(random() * (lightSlots - 1));
          if (random() < 0.5) {
            counted[j + 1] = (counted[j + 1] ?? 0) + (counted[j] ?? 0);
            counted[j] = 0;
          } else counted[j] = (counted[j] ?? 0) * 2;
        }
        // Belts that run only at set times deliver (and so count) the eggs laid since the last run.
        if (runSlots) {
          let held = 0;
          for (let j = 0; j < SLOTS_PER_DAY; j++) {
            held += counted[j] ?? 0;
            counted[j] = 0;
            if (runSlots.has(j) || j === SLOTS_PER_DAY - 1) {
              counted[j] = countAt(j, held);
              held = 0;
            }
          }
        }
        // The collector counts every egg laid (a dead belt counter does not stop the belt), a little later.
        for (let j = 0; j < SLOTS_PER_DAY; j++) {
          const delivered = runSlots ? deliveredAt(laid, runSlots, j) : (laid[j] ?? 0);
          collector[j + o.collectorLagSlots] =
            (collector[j + o.collectorLagSlots] ?? 0) + delivered;
        }
        sections.push({ row, tier, counted, laid, expectedWithoutFault });
      }
    }
    // Eggs still on their way at the day's end reach the collector on the next day.
    const collectorDay = new Int32Array(SLOTS_PER_DAY);
    for (let j = 0; j < SLOTS_PER_DAY; j++) collectorDay[j] = collector[j] ?? 0;
    if (day > 0) {
      const previous = this.dayData(day - 1);
      const carried = previous.collectorCarry ?? new Int32Array(0);
      for (let j = 0; j < carried.length; j++)
        collectorDay[j] = (collectorDay[j] ?? 0) + (carried[j] ?? 0);
    }
    for (const f of o.faults) {
      if (f.kind !== 'collector-drift') continue;
      for (let j = 0; j < SLOTS_PER_DAY; j++) {
        if (dayStart + j >= f.onsetSlot)
          collectorDay[j] = Math.round((collectorDay[j] ?? 0) * (1 + f.pct / 100));
      }
    }
    const result: SimDay = {
      day,
      sections,
      collector: collectorDay,
      collectorCarry: collector.slice(SLOTS_PER_DAY),
    };
    this.cache.set(day, result);
    // Only the last few days are kept: a long run stays small.
    this.cache.delete(day - 3);
    return result;
  }
}

/** Eggs a scheduled belt delivers at slot j: what was laid since its previous run. */
function deliveredAt(laid: Int32Array, runSlots: ReadonlySet<number>, j: number): number {
  if (!runSlots.has(j) && j !== SLOTS_PER_DAY - 1) return 0;
  let sum = 0;
  for (let k = j; k >= 0; k--) {
    if (k !== j && (runSlots.has(k) || k === SLOTS_PER_DAY - 1)) break;
    sum += laid[k] ?? 0;
  }
  return sum;
}
