/**
 * The farm simulator: stands in for farms' gateways, posting counter readings to Tierscope's ingest API.
 * Run `npm run simulate -- --help`.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { simulatorFarmSchema, type SimulatorFarm } from '@tierscope/contracts';
import { describeFault, parseFault, type Fault } from './faults';
import { HouseModel, type Reading } from './house-model';
import { RealisticHouseModel } from './realistic-model';
import { Sender } from './sender';

const HELP = `Tierscope farm simulator — posts egg-counter readings like a farm's gateway.

Usage: npm run simulate -- --farm-file FILE [--farm-file FILE …] [options]

  --farm-file FILE        a farm to simulate (JSON: API URL, gateway key, houses and counters); repeatable
  --seed N                the same seed gives the same eggs for every reading (default 1)
  --model M               realistic (default): binomial counts, day-to-day section and house noise,
                          persistent section differences, lay times after lights-on, faults with realistic
                          shapes; tidy: Poisson counts around a smooth curve (exact, for unit tests)
  --section-noise S       realistic model: σ of each section's day-to-day factor (default 0.025)
  --backfill-days N       first post N days of history, as fast as the API takes it (default 0)
  --backfill-interval M   minutes between history readings (default 15)
  --backfill-from ISO     start the backfill at this instant instead (e.g. a lights-on, so its first
                          production day is whole)
  --interval M            minutes between live readings (default 1)
  --speed S               1 = real time; up to 1440 (a simulated day per minute). Above 1, the day before the
                          start is replayed at that speed, then the simulator keeps pace with the clock
                          (readings are never in the future)
  --duration H            stop after H simulated hours of live running (default: run until stopped)
  --start ISO             the simulation's "now" (default: the current time)
  --fault SPEC            plant a fault; repeatable. Kinds:
                            feed:house=House 1,row=3,drop=0.15,from=+2h      one row, all tiers
                            water:house=House 1,tier=2,decline=0.02/h        one tier, slowly worse
                            silent:house=House 1,row=2,tier=1,from=-1h       a dead counter
                            collector-drift:house=House 1,pct=4              collector reads off
                          from= takes +30m, +2h, -3d (from the start) or an ISO time
  --summary FILE          on exit, write what was sent (eggs, readings) as JSON
  --help                  this text
`;

function log(line: string): void {
  console.log(`[sim] ${line}`);
}

function floorTo(date: Date, minutes: number): Date {
  const step = minutes * 60_000;
  return new Date(Math.floor(date.getTime() / step) * step);
}

interface FarmRun {
  farm: SimulatorFarm;
  models: { readingsFor(from: Date, to: Date): Reading[] }[];
  sender: Sender;
  eggs: number;
  readings: number;
}

function generate(run: FarmRun, from: Date, to: Date): Reading[] {
  const readings = run.models.flatMap((model) => model.readingsFor(from, to));
  run.readings += readings.length;
  run.eggs += readings.reduce((n, r) => n + r.eggs, 0);
  return readings;
}

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: {
      'farm-file': { type: 'string', multiple: true },
      seed: { type: 'string', default: '1' },
      model: { type: 'string', default: 'realistic' },
      'section-noise': { type: 'string' },
      'backfill-days': { type: 'string', default: '0' },
      'backfill-interval': { type: 'string', default: '15' },
      'backfill-from': { type: 'string' },
      interval: { type: 'string', default: '1' },
      speed: { type: 'string', default: '1' },
      duration: { type: 'string' },
      start: { type: 'string' },
      fault: { type: 'string', multiple: true },
      summary: { type: 'string' },
      help: { type: 'boolean', default: false },
    },
  });
  if (values.help || !values['farm-file']?.length) {
    console.log(HELP);
    process.exit(values.help ? 0 : 2);
  }
  const seed = Number(values.seed);
  const speed = Number(values.speed);
  const interval = Number(values.interval);
  const backfillInterval = Number(values['backfill-interval']);
  const backfillDays = Number(values['backfill-days']);
  const durationHours = values.duration === undefined ? Infinity : Number(values.duration);
  if (!(speed >= 1 && speed <= 1440)) throw new Error('--speed must be from 1 to 1440');
  if (!(interval > 0) || !(backfillInterval > 0))
    throw new Error('intervals must be positive minutes');
  const start = values.start ? new Date(values.start) : new Date();
  if (Number.isNaN(start.getTime())) throw new Error('--start is not a time');
  const faults: Fault[] = (values.fault ?? []).map((spec) => parseFault(spec, start));
  if (values.model !== 'realistic' && values.model !== 'tidy')
    throw new Error('--model is realistic or tidy');
  const sectionNoise =
    values['section-noise'] === undefined ? undefined : Number(values['section-noise']);
  if (sectionNoise !== undefined && !(sectionNoise >= 0 && sectionNoise < 0.5))
    throw new Error('--section-noise is a σ from 0 to 0.5');

  const runs: FarmRun[] = values['farm-file'].map((file) => {
    const farm = simulatorFarmSchema.parse(JSON.parse(readFileSync(file, 'utf8')));
    return {
      farm,
      models: farm.houses.map((house) =>
        values.model === 'tidy'
          ? new HouseModel(house, { seed, start, faults })
          : new RealisticHouseModel(house, {
              seed,
              start,
              faults,
              ...(sectionNoise === undefined ? {} : { sectionNoise }),
            }),
      ),
      sender: new Sender({
        apiUrl: farm.apiUrl,
        gatewayKey: farm.gatewayKey,
        log: (line) => {
          log(`${farm.farm}: ${line}`);
        },
      }),
      eggs: 0,
      readings: 0,
    };
  });
  for (const run of runs)
    log(
      `${run.farm.farm}: ${run.models.length} houses, ${run.farm.houses.reduce((n, h) => n + h.counters.length, 0)} counters`,
    );

  const state = { isStopping: false };
  const finish = async (code: number) => {
    state.isStopping = true;
    await Promise.race([
      Promise.all(runs.map((r) => r.sender.drain())),
      new Promise((r) => setTimeout(r, 10_000)),
    ]);
    const summary = {
      seed,
      farms: runs.map((r) => ({
        farm: r.farm.farm,
        eggs: r.eggs,
        readings: r.readings,
        ...r.sender.stats,
        backlog: r.sender.backlog,
      })),
    };
    if (values.summary) writeFileSync(values.summary, JSON.stringify(summary, null, 2));
    for (const f of summary.farms)
      log(
        `${f.farm}: sent ${f.readings} readings, ${f.eggs} eggs (${f.accepted} new, ${f.duplicates} already there)`,
      );
    process.exit(code);
  };
  process.on('SIGINT', () => void finish(0));
  process.on('SIGTERM', () => void finish(0));

  const liveStart = floorTo(speed > 1 ? new Date(start.getTime() - 86_400_000) : start, interval);
  const backfillFrom = values['backfill-from'] ? new Date(values['backfill-from']) : null;
  if (backfillFrom && (Number.isNaN(backfillFrom.getTime()) || backfillFrom >= liveStart))
    throw new Error('--backfill-from must be a time before now');
  if (backfillDays > 0 || backfillFrom) {
    const from = floorTo(
      backfillFrom ?? new Date(liveStart.getTime() - backfillDays * 86_400_000),
      backfillInterval,
    );
    log(`backfilling ${backfillDays} days from ${from.toISOString()}…`);
    const step = backfillInterval * 60_000;
    for (const run of runs) {
      let batch: Reading[] = [];
      for (
        let t = from.getTime() + step;
        t <= liveStart.getTime() && !state.isStopping;
        t += step
      ) {
        batch.push(...generate(run, new Date(t - step), new Date(t)));
        if (batch.length >= 5000) {
          run.sender.enqueue(batch);
          batch = [];
          await run.sender.whenBelow(6);
        }
      }
      run.sender.enqueue(batch);
    }
    await Promise.all(runs.map((r) => r.sender.drain()));
    log('backfill done');
  }

  const announced = new Set<Fault>();
  const announce = (until: Date) => {
    for (const fault of faults) {
      if (!announced.has(fault) && fault.from <= until) {
        announced.add(fault);
        log(`fault started at ${fault.from.toISOString()}: ${describeFault(fault)}`);
      }
    }
  };
  announce(liveStart);
  if (durationHours <= 0) {
    await finish(0);
    return;
  }
  log(`live from ${liveStart.toISOString()} every ${interval} min at ${speed}×`);
  const realStart = Date.now();
  const end = liveStart.getTime() + durationHours * 3_600_000;
  let cursor = liveStart.getTime();
  const step = interval * 60_000;
  const tick = async () => {
    const clock = Math.min(Date.now(), liveStart.getTime() + (Date.now() - realStart) * speed);
    while (cursor + step <= clock && cursor + step <= end && !state.isStopping) {
      const from = new Date(cursor);
      const to = new Date(cursor + step);
      announce(to);
      for (const run of runs) run.sender.enqueue(generate(run, from, to));
      cursor += step;
    }
    if (cursor + step > end) {
      await finish(0);
      return;
    }
    setTimeout(() => void tick(), 250);
  };
  await tick();
}

main().catch((error: unknown) => {
  console.error(`[sim] ${error instanceof Error ? error.message : String(error)}`);
  process.exit(1);
});
