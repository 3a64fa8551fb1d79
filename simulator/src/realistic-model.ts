import type { SimulatorHouse } from '@tierscope/contracts';
import { addDays, productionDayOf, productionDayStart } from '@tierscope/domain';
import type { Fault } from './faults';
import type { Reading } from './house-model';
import { hashSeed } from './random';
import {
  RealisticHouse,
  SLOT_MINUTES,
  SLOTS_PER_DAY,
  type PlantedFault,
  type SimDay,
} from './realistic';

const DAY_MS = 86_400_000;
const SLOT_MS = SLOT_MINUTES * 60_000;
/** Deaths per hen per day (0.02 %/day, in the usual range for a laying flock — from memory, no source). */
const DAILY_MORTALITY = 0.0002;

export interface RealisticModelOptions {
  seed: number;
  /** Simulation start: the flock's age in the farm file is its age at this instant. */
  start: Date;
  faults?: readonly Fault[];
  /** σ of each section's lognormal day-to-day factor (default 2.5 %) */
  sectionNoise?: number;
  /** hens of one section on a production day (default: the farm file's hens less 0.02 % a day from the start) */
  hensOn?: (day: string) => number;
}

/**
 * A farm file's house driven by the realistic simulator (realistic.ts): production days from lights-on in the
 * house's own time zone (23- and 25-hour days included), each day's 15-minute counts spread evenly over the
 * minutes of their slot, so the readings of any interval add up to the day's counts exactly. The simulator's
 * fault specs are planted with their realistic shapes (a feed line shows over about a day, a water problem
 * on a tier is a slow slide, a dead counter still lets its eggs reach the collector).
 */
export class RealisticHouseModel {
  private readonly model: RealisticHouse;
  private readonly belts: { externalId: string; row: number; tier: number }[];
  private readonly collector: string | undefined;
  /** the production day the model counts as its day 0 */
  private readonly epoch: string;

  constructor(
    readonly house: SimulatorHouse,
    options: RealisticModelOptions,
  ) {
    const { timezone, lightsOn } = house;
    this.epoch = productionDayOf(options.start, timezone, lightsOn);
    this.belts = house.counters
      .filter((c) => c.kind === 'belt' && c.row !== null && c.tier !== null)
      .map((c) => ({ externalId: c.externalId, row: c.row ?? 0, tier: c.tier ?? 0 }));
    this.collector = house.counters.find((c) => c.kind === 'collector')?.externalId;
    const sections = Math.max(1, house.rows * house.tiers);
    const epochStart = productionDayStart(this.epoch, timezone, lightsOn);
    const ageAtEpoch =
      house.flockAgeWeeks - (options.start.getTime() - epochStart.getTime()) / (7 * DAY_MS);
    // The farm file's hens are those in the house at the start; from then on 0.02 % die each day.
    const hensOn =
      options.hensOn ??
      ((day: string) =>
        (house.hensHoused / sections) *
        Math.exp(-DAILY_MORTALITY * Math.max(0, this.dayIndex(day))));
    this.model = new RealisticHouse({
      rows: house.rows,
      tiers: house.tiers,
      seed: hashSeed(options.seed, house.name),
      photoperiodHours: house.photoperiodHours,
      startAgeWeeks: ageAtEpoch,
      ...(options.sectionNoise === undefined ? {} : { sectionNoise: options.sectionNoise }),
      hensOn: (day) => hensOn(addDays(this.epoch, day)),
      faults: (options.faults ?? [])
        .filter((f) => f.house === house.name)
        .map((f) => this.plant(f)),
    });
  }

  /** The model's day index of a production day. */
  private dayIndex(day: string): number {
    return Math.round(
      (Date.parse(`${day}T00:00:00Z`) - Date.parse(`${this.epoch}T00:00:00Z`)) / DAY_MS,
    );
  }

  /** Where an instant falls: its production day's index and the milliseconds since that day's lights-on. */
  private locate(at: Date): { day: number; offsetMs: number } {
    const date = productionDayOf(at, this.house.timezone, this.house.lightsOn);
    const start = productionDayStart(date, this.house.timezone, this.house.lightsOn);
    return { day: this.dayIndex(date), offsetMs: at.getTime() - start.getTime() };
  }

  private absoluteSlot(at: Date): number {
    const { day, offsetMs } = this.locate(at);
    return day * SLOTS_PER_DAY + Math.min(SLOTS_PER_DAY - 1, Math.floor(offsetMs / SLOT_MS));
  }

  private plant(fault: Fault): PlantedFault {
    const onsetSlot = this.absoluteSlot(fault.from);
    switch (fault.kind) {
      case 'feed':
        return { kind: 'row', row: fault.row, drop: fault.drop, onsetSlot };
      case 'water':
        return {
          kind: 'tier-slide',
          tier: fault.tier,
          perDay: fault.declinePerHour * 24,
          onsetSlot,
        };
      case 'silent':
        return { kind: 'dead', row: fault.row, tier: fault.tier, onsetSlot };
      case 'collector-drift':
        return { kind: 'collector-drift', pct: fault.pct, onsetSlot };
    }
  }

  /** One production day as the simulator draws it (counts per section and slot, the collector's). */
  day(date: string): SimDay {
    return this.model.dayData(this.dayIndex(date));
  }

  /** What `pick` counted between two located instants, across production days. */
  private countBetween(
    a: { day: number; offsetMs: number },
    b: { day: number; offsetMs: number },
    pick: (day: SimDay) => Int32Array,
  ): number {
    const at = (day: number) => pick(this.model.dayData(day));
    if (a.day === b.day) return upTo(at(b.day), b.offsetMs) - upTo(at(a.day), a.offsetMs);
    let sum = total(at(a.day)) - upTo(at(a.day), a.offsetMs);
    for (let d = a.day + 1; d < b.day; d++) sum += total(at(d));
    return sum + upTo(at(b.day), b.offsetMs);
  }

  /** Every counter's reading for the interval ending at `to`. */
  readingsFor(from: Date, to: Date): Reading[] {
    const ts = to.toISOString();
    const a = this.locate(from);
    const b = this.locate(to);
    const readings: Reading[] = this.belts.map((belt) => ({
      counter: belt.externalId,
      ts,
      eggs: this.countBetween(a, b, (day) => {
        const section = day.sections.find((s) => s.row === belt.row && s.tier === belt.tier);
        return section?.counted ?? new Int32Array(SLOTS_PER_DAY);
      }),
    }));
    if (this.collector)
      readings.push({
        counter: this.collector,
        ts,
        eggs: this.countBetween(a, b, (day) => day.collector),
      });
    return readings;
  }
}

/** Counts of a day's slots up to `offsetMs` after lights-on, the slot under way spread evenly by minute. */
function upTo(counts: Int32Array, offsetMs: number): number {
  const slots = Math.max(0, offsetMs) / SLOT_MS;
  const whole = Math.min(SLOTS_PER_DAY, Math.floor(slots));
  let sum = 0;
  for (let j = 0; j < whole; j++) sum += counts[j] ?? 0;
  if (whole < SLOTS_PER_DAY) sum += Math.floor((counts[whole] ?? 0) * (slots - whole));
  return sum;
}

function total(counts: Int32Array): number {
  let sum = 0;
  for (let j = 0; j < SLOTS_PER_DAY; j++) sum += counts[j] ?? 0;
  return sum;
}
