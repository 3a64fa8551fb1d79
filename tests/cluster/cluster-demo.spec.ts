import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { schema } from '@tierscope/db';
import { DEMO_TIMEZONE, demoFlocks, seedDemo } from '@tierscope/db/seed';
import { createTestDatabase } from '@tierscope/db/testing';
import { addDays, productionDayOf, productionDayStart } from '@tierscope/domain';
import { startMailCatcher, type MailCatcher } from '@tierscope/mail-catcher';
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startBalancer } from '../../scripts/balancer';
import { DEMO_FAULTS, DEMO_SIMULATOR_SEED, writeDemoHistory } from '../../scripts/demo-history';
import { prepareSimulatorFarms } from '../../scripts/demo-simulator';
import { startApiProcess, type ApiProcess } from '../../scripts/processes';

/**
 * The demo scenario on three API processes behind the balancer: the realistic simulator posts 14 days of
 * readings through the balancer, so every house's batches land on every process, and each process replays
 * the days it was sent. The three planted faults are found once each, each house's people get one mail,
 * and no two processes ever evaluated one house at the same time — from the processes' own evaluation
 * lines (LOG_EVALUATIONS), checked here interval by interval. The start is 16:00 UTC three weeks ago: the
 * processes replay up to today, and a backfill's replay reaches back at most MAX_HISTORY_DAYS (62), so a
 * fixed date would fall out of reach; the simulator's noise is keyed by the day's index from the start, so
 * the same days come out on any date (the single-process demo-scenario test keeps a fixed date).
 */
const START = new Date(
  `${new Date(Date.now() - 21 * 86_400_000).toISOString().slice(0, 10)}T16:00:00Z`,
);
const DAYS = 14;
const PROCESSES = 3;

let database: Awaited<ReturnType<typeof createTestDatabase>>;
let dir: string;
let catcher: MailCatcher;
let processes: ApiProcess[] = [];
const lines: string[] = [];

beforeAll(async () => {
  database = await createTestDatabase();
  dir = mkdtempSync(join(tmpdir(), 'tierscope-cluster-demo-'));
  catcher = await startMailCatcher({ keep: 1000 });
  await seedDemo(database.db, START.toISOString().slice(0, 10));
  const env = {
    DATABASE_URL: database.url,
    JWT_SECRET: randomBytes(32).toString('hex'),
    SMTP_URL: `smtp://127.0.0.1:${catcher.smtpPort}`,
    EXCEPTION_MAIL_SECONDS: '1',
    LOG_EVALUATIONS: 'true',
  };
  processes = await Promise.all(
    Array.from({ length: PROCESSES }, async (_, i) => {
      const api = await startApiProcess(
        { ...env, DATA_DIR: join(dir, `data-${i}`) },
        { stdio: ['ignore', 'pipe', 'ignore'] },
      );
      let rest = '';
      api.child.stdout?.setEncoding('utf8').on('data', (chunk: string) => {
        const parts = (rest + chunk).split('\n');
        rest = parts.pop() ?? '';
        lines.push(...parts);
      });
      return api;
    }),
  );
}, 120_000);

afterAll(async () => {
  await Promise.all(processes.map((p) => p.stop()));
  await catcher.close();
  await database.drop();
  rmSync(dir, { recursive: true, force: true });
});

async function until(isDone: () => Promise<boolean>, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await isDone())) {
    if (Date.now() > deadline) throw new Error('timed out waiting');
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
}

/** True once no process has held a house's lease or waited to replay one for `quietMs`. */
function quietFor(quietMs: number) {
  let quietSince: number | null = null;
  return async () => {
    const busy = await database.db.execute<{ n: number }>(sql`
      SELECT count(*)::int AS n FROM leases
      WHERE (name LIKE 'house:%' OR name LIKE 'replay:%') AND until > now()`);
    if ((busy.rows[0]?.n ?? 0) > 0) quietSince = null;
    else quietSince ??= Date.now();
    return quietSince !== null && Date.now() - quietSince >= quietMs;
  };
}

describe('the demo scenario on three API processes behind the balancer', () => {
  it('finds the planted faults once each, mails each house once, and never evaluates a house twice at once', async () => {
    const balancer = await startBalancer({ port: 0, targets: processes.map((p) => p.baseUrl) });
    try {
      const { db } = database;
      const [first] = await db.select().from(schema.houses);
      const zone = first?.timezone ?? DEMO_TIMEZONE;
      const lightsOn = first?.lightsOn ?? '04:00';
      const firstDay = productionDayOf(
        new Date(START.getTime() - DAYS * 86_400_000),
        zone,
        lightsOn,
      );
      // The morning walks go on to yesterday, as `npm start` writes them.
      await writeDemoHistory(
        db,
        addDays(firstDay, -1),
        START,
        addDays(productionDayOf(START, zone, lightsOn), -1),
      );
      const farmFiles = await prepareSimulatorFarms({
        apiUrl: `http://127.0.0.1:${balancer.port}`,
        dataDir: dir,
        flocks: await demoFlocks(db, START),
      });
      // The simulator itself, as `npm start` runs it, posting through the balancer; it stops after the backfill.
      const simulator = spawn(
        process.execPath,
        [
          '--import',
          'tsx',
          'simulator/src/main.ts',
          ...farmFiles.flatMap((file) => ['--farm-file', file]),
          ...['--seed', String(DEMO_SIMULATOR_SEED), '--start', START.toISOString()],
          ...['--backfill-from', productionDayStart(firstDay, zone, lightsOn).toISOString()],
          ...['--backfill-interval', '15', '--duration', '0'],
          ...DEMO_FAULTS.flatMap((fault) => ['--fault', fault]),
        ],
        { cwd: join(import.meta.dirname, '../..'), stdio: ['ignore', 'ignore', 'inherit'] },
      );
      const code = await new Promise((resolve) => simulator.once('exit', resolve));
      expect(code).toBe(0);
      // Every process replays what it was sent; then the minute sweep. Wait until nobody holds a house.
      await until(quietFor(10_000), 420_000);
      // Mails go out on a one-second timer; wait until every exception still open was claimed for one.
      await until(async () => {
        const unsent = await db.execute<{ n: number }>(sql`
          SELECT count(*)::int AS n FROM exceptions
          WHERE notified_at IS NULL AND status <> 'closed' AND NOT is_learning`);
        return unsent.rows[0]?.n === 0;
      }, 30_000);
      await new Promise((resolve) => setTimeout(resolve, 2000));

      // The three planted faults, each found once (every exception the processes ever opened is listed).
      const found = await db.execute<{ line: string }>(sql`
        SELECT h.name || ' ' || e.kind || ' ' || e.scope || ' ' ||
               coalesce(e.row::text, '-') || ':' || coalesce(e.tier::text, '-') AS line
        FROM exceptions e JOIN houses h ON h.id = e.house_id ORDER BY line`);
      expect(found.rows.map((r) => r.line)).toEqual([
        'House 2 shortfall row 4:-',
        'House 3 silent_counter section 2:1',
        'House A shortfall tier -:3',
      ]);

      // One mail per house and recipient, whichever process claimed it.
      const exceptionMails = catcher.messages().filter((m) => / exceptions? in /.test(m.subject));
      const perRecipientAndHouse = new Map<string, number>();
      for (const mail of exceptionMails)
        for (const to of mail.to) {
          const key = `${to} ${mail.subject}`;
          perRecipientAndHouse.set(key, (perRecipientAndHouse.get(key) ?? 0) + 1);
        }
      expect([...perRecipientAndHouse.values()].filter((n) => n > 1)).toEqual([]);
      const mailedHouses = new Set(exceptionMails.map((m) => m.subject.split(' in ').pop()));
      expect([...mailedHouses].sort()).toEqual(['House 2', 'House 3', 'House A']);

      // No two evaluations of one house overlapped, across the three processes.
      const runs = lines.flatMap((line) => {
        const m = /evaluation house=(\d+) holder=(\S+) started=(\S+) ended=(\S+)/.exec(line);
        return m
          ? [{ house: m[1]!, holder: m[2]!, started: Date.parse(m[3]!), ended: Date.parse(m[4]!) }]
          : [];
      });
      const overlaps: string[] = [];
      for (const house of new Set(runs.map((r) => r.house))) {
        const ofHouse = runs.filter((r) => r.house === house).sort((a, b) => a.started - b.started);
        for (let i = 1; i < ofHouse.length; i++)
          if (ofHouse[i]!.started < ofHouse[i - 1]!.ended)
            overlaps.push(`house ${house}: ${ofHouse[i - 1]!.holder} and ${ofHouse[i]!.holder}`);
      }
      expect(overlaps).toEqual([]);
      // The check saw real work spread over the cluster: every house evaluated, by more than one process.
      expect(new Set(runs.map((r) => r.house)).size).toBe(5);
      expect(new Set(runs.map((r) => r.holder)).size).toBeGreaterThan(1);
      console.log(
        `cluster demo: ${runs.length} evaluations by ${new Set(runs.map((r) => r.holder)).size} processes, ${exceptionMails.length} exception mails`,
      );
    } finally {
      await balancer.close();
    }
  }, 600_000);
});
