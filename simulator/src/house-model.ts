import type { SimulatorHouse } from '@tierscope/contracts';
import { minutesSinceLightsOn } from '@tierscope/domain';
import type { Fault } from './faults';
import {
  DEFAULT_LAY_CURVE,
  DEFAULT_LAY_TIMING,
  layRate,
  layShare,
  type LayCurve,
  type LayTiming,
} from './lay-model';
import { generator, hashSeed, poisson } from './random';

export interface ModelOptions {
  seed: number;
  /** Simulation start: the flock's age in the farm file is its age at this instant. */
  start: Date;
  curve?: LayCurve;
  timing?: LayTiming;
  /** Deaths per hen per day (0.0002 = 0.02 %/day, in the usual range for a laying flock [M]). */
  dailyMortality?: number;
  faults?: Fault[];
}

export interface Reading {
  counter: string;
  ts: string;
  eggs: number;
}

const DAY_MS = 86_400_000;

/**
 * One simulated house: hens spread over rows × tiers with small persistent differences (end rows and the
 * top tier a little lower, middle tiers where more hens choose to nest), a lay rate by flock age, eggs
 * spread over the light period and Poisson noise, plus any planted faults.
 */
export class HouseModel {
  private readonly factors = new Map<string, number>();
  private readonly belts: { externalId: string; row: number; tier: number }[];
  private readonly collector: string | undefined;
  private readonly faults: Fault[];

  constructor(
    readonly house: SimulatorHouse,
    private readonly options: ModelOptions,
  ) {
    this.belts = house.counters
      .filter((c) => c.kind === 'belt' && c.row !== null && c.tier !== null)
      .map((c) => ({ externalId: c.externalId, row: c.row ?? 0, tier: c.tier ?? 0 }));
    this.collector = house.counters.find((c) => c.kind === 'collector')?.externalId;
    this.faults = (options.faults ?? []).filter((f) => f.house === house.name);
    const weights = this.belts.map((b) => this.baseWeight(b.row, b.tier));
    const mean = weights.reduce((a, b) => a + b, 0) / Math.max(weights.length, 1);
    this.belts.forEach((b, i) => this.factors.set(b.externalId, (weights[i] ?? 1) / mean));
  }

  private baseWeight(row: number, tier: number): number {
    const { rows, tiers } = this.house;
    const endRow = row === 1 || row === rows ? 0.95 : 1;
    const tierWeight = tiers === 1 ? 1 : tier === 1 ? 0.92 : tier === tiers ? 0.97 : 1.08;
    const jitter =
      0.97 + 0.06 * generator(hashSeed(this.options.seed, this.house.name, row, tier))();
    return endRow * tierWeight * jitter;
  }

  private hensAlive(at: Date): number {
    const days = (at.getTime() - this.options.start.getTime()) / DAY_MS;
    return (
      this.house.hensHoused *
      Math.exp(
        -(this.options.dailyMortality ?? 0.0002) *
          Math.max(0, days + 7 * (this.house.flockAgeWeeks - 17)),
      )
    );
  }

  private faultFactor(row: number, tier: number, at: Date): number {
    let factor = 1;
    for (const fault of this.faults) {
      if (at < fault.from) continue;
      if (fault.kind === 'feed' && fault.row === row) factor *= 1 - fault.drop;
      if (fault.kind === 'water' && fault.tier === tier) {
        const hours = (at.getTime() - fault.from.getTime()) / 3_600_000;
        factor *= Math.max(0.4, 1 - fault.declinePerHour * hours);
      }
    }
    return factor;
  }

  private isSilent(row: number, tier: number, at: Date): boolean {
    return this.faults.some(
      (f) => f.kind === 'silent' && f.row === row && f.tier === tier && at >= f.from,
    );
  }

  /** Expected eggs laid in one section during (from, to]. */
  expectedEggs(row: number, tier: number, externalId: string, from: Date, to: Date): number {
    const ageWeeks =
      this.house.flockAgeWeeks + (to.getTime() - this.options.start.getTime()) / (7 * DAY_MS);
    const dailyEggs =
      this.hensAlive(to) * layRate(ageWeeks, this.options.curve ?? DEFAULT_LAY_CURVE);
    const perSection = dailyEggs / Math.max(this.belts.length, 1);
    const startMinutes = minutesSinceLightsOn(from, this.house.timezone, this.house.lightsOn);
    const spanHours = (to.getTime() - from.getTime()) / 3_600_000;
    const share = layShare(
      startMinutes / 60,
      startMinutes / 60 + spanHours,
      this.house.photoperiodHours,
      this.options.timing ?? DEFAULT_LAY_TIMING,
    );
    return (
      perSection * share * (this.factors.get(externalId) ?? 1) * this.faultFactor(row, tier, to)
    );
  }

  /** Every counter's reading for the interval ending at `to`. */
  readingsFor(from: Date, to: Date): Reading[] {
    const ts = to.toISOString();
    const readings: Reading[] = [];
    let laid = 0;
    for (const belt of this.belts) {
      const random = generator(hashSeed(this.options.seed, belt.externalId, to.getTime()));
      const eggs = poisson(
        this.expectedEggs(belt.row, belt.tier, belt.externalId, from, to),
        random,
      );
      laid += eggs;
      // A dead counter still sends, but counts nothing; the eggs still reach the collector.
      readings.push({
        counter: belt.externalId,
        ts,
        eggs: this.isSilent(belt.row, belt.tier, to) ? 0 : eggs,
      });
    }
    if (this.collector) {
      const drift = this.faults
        .filter(
          (f): f is Extract<Fault, { kind: 'collector-drift' }> =>
            f.kind === 'collector-drift' && to >= f.from,
        )
        .reduce((factor, f) => factor * (1 + f.pct / 100), 1);
      readings.push({ counter: this.collector, ts, eggs: Math.round(laid * drift) });
    }
    return readings;
  }
}
