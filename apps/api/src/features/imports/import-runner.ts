/**
 * Runs imports in the background under a lease: claims one, streams its file through csv-parse, saves readings
 * in batches (each counted once), reports progress and line errors, and resumes a job whose process died.
 * Reading the columns and lines is in import-columns.ts; storage in imports.repository.ts.
 */
import { randomUUID } from 'node:crypto';
import { importMappingSchema, type ImportMapping } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { detectDelimiter, stepFromTotals, LINE_ENDINGS, type DecimalMark } from '@tierscope/domain';
import { parse, type Info } from 'csv-parse';
import type { EventBus } from '../../platform/events';
import { markReplayPending } from '../../platform/cluster.repository';
import { withLease } from '../../platform/leases';
import { REPLAY_MARK_MS } from '../evaluation/evaluation-scheduler';
import { openImportFile, removeImportFile } from './import-files';
import { copyReadingsInChunks } from '../ingest/bulk-ingest.repository';
import { ensureReadingPartitions } from '../ingest/ingest.repository';
import {
  clearErrors,
  findImport,
  houseCounters,
  insertErrors,
  interruptedImports,
  poolOf,
  updateImport,
  type ImportRow,
} from './imports.repository';
import {
  MappingProblem,
  readSample,
  readingsOf,
  resolveColumns,
  type LineError,
  type Resolved,
} from './import-columns';

/** Errors kept per import (all are counted; the CSV download holds these). */
export const MAX_STORED_ERRORS = 10_000;
/** An import's lease: a process that dies mid-import leaves it to another after this long. */
export const IMPORT_LEASE_MS = 15_000;
/** How often a running import writes its progress and looks for a cancel request. */
const REPORT_MS = 500;

class Cancelled extends Error {}

export interface ImportProgress {
  id: number;
  farmId: number;
  houseId: number;
  state: ImportRow['state'];
  linesRead: number;
  readingsAdded: number;
  duplicates: number;
  errorCount: number;
  bytesRead: number;
  bytes: number;
}

/**
 * Runs historical imports in the background, one at a time: streams the stored file through csv-parse,
 * checks each line, and loads the good readings through the same exactly-once bulk path as the benchmark
 * (COPY into staging, ON CONFLICT DO NOTHING, rollups of the new rows only). An import that stopped
 * half-way is run again from the start (by this process's next start or another process's sweep) and
 * counts each reading once.
 */
export class ImportRunner {
  private readonly queue: number[] = [];
  private current: Promise<void> | null = null;
  private isDisposed = false;

  constructor(
    private readonly db: Database,
    private readonly events: EventBus,
    private readonly importsDir: string,
    private readonly log: (message: string, error?: unknown) => void,
    private readonly options: { chunkRows?: number; reportMs?: number } = {},
    private readonly holder: string = randomUUID(),
  ) {}

  enqueue(id: number): void {
    if (this.isDisposed || this.queue.includes(id)) return;
    this.queue.push(id);
    this.pump();
  }

  /**
   * Queues again what a stop interrupted — at start, and on every minute's sweep (an import whose process
   * died is taken over once its lease has run out; one still held elsewhere is skipped when its turn comes).
   */
  async resumeInterrupted(): Promise<number> {
    const rows = await interruptedImports(this.db);
    for (const row of rows) this.enqueue(row.id);
    return rows.length;
  }

  /** Resolves when the queue is empty and nothing runs (tests wait on this). */
  async idle(): Promise<void> {
    while (this.current) await this.current;
  }

  dispose(): void {
    this.isDisposed = true;
    this.queue.length = 0;
  }

  private pump(): void {
    if (this.current) return;
    const next = this.queue.shift();
    if (next === undefined) return;
    // One process of the cluster runs an import at a time: the one holding its lease. Another one busy
    // with it is left to it; when that process dies its lease runs out and the next sweep takes it over.
    this.current = withLease(this.db, `import:${next}`, this.holder, () => this.run(next), {
      leaseMs: IMPORT_LEASE_MS,
    })
      .then((outcome) => {
        // Held elsewhere: running there, or left by a process that died (its lease runs out) — look again
        // then (a finished import is not run again: run() reads its state first).
        if (!outcome.ran && !this.isDisposed) {
          setTimeout(() => {
            this.enqueue(next);
          }, IMPORT_LEASE_MS).unref();
        }
      })
      .catch(async (error: unknown) => {
        this.log(`import ${next} failed`, error);
        // Never leave a job "running" behind: it would be queued again at every start.
        await updateImport(this.db, next, {
          state: 'failed',
          finishedAt: new Date(),
          message: 'The import stopped on an unexpected error; it can be run again',
        }).catch((again: unknown) => {
          this.log(`import ${next} could not be marked failed`, again);
        });
      })
      .finally(() => {
        this.current = null;
        if (!this.isDisposed) this.pump();
      });
  }

  private emit(row: ImportRow): void {
    this.events.emit('import.progress', {
      id: row.id,
      farmId: row.farmId,
      houseId: row.houseId,
      state: row.state,
      linesRead: row.linesRead,
      readingsAdded: row.readingsAdded,
      duplicates: row.duplicates,
      errorCount: row.errorCount,
      bytesRead: row.bytesRead,
      bytes: row.bytes,
    });
  }

  private async run(id: number): Promise<void> {
    const found = await findImport(this.db, id);
    if (!found || found.import.state === 'done' || found.import.state === 'cancelled') return;
    const file = found.import.storedName;
    if (found.import.cancelRequestedAt) {
      await this.finish(id, file, { state: 'cancelled', message: 'Cancelled before it started' });
      return;
    }
    // From the start: counts of an earlier, interrupted run are recounted (the readings themselves are not).
    await clearErrors(this.db, id);
    const started = await updateImport(this.db, id, {
      state: 'running',
      startedAt: new Date(),
      finishedAt: null,
      linesRead: 0,
      readingsAdded: 0,
      duplicates: 0,
      errorCount: 0,
      bytesRead: 0,
      message: null,
    });
    if (started) this.emit(started);
    try {
      const mapping = importMappingSchema.parse(found.import.mapping);
      const result = await this.load(found.import, file, mapping);
      // Its days are to be judged again: marked before it reads as done, so no page says they are judged
      // in the moment before this process's scheduler takes them up (it clears the mark when it has).
      if (result.readingsAdded > 0)
        await markReplayPending(this.db, found.import.houseId, this.holder, REPLAY_MARK_MS);
      const done = await this.finish(id, file, {
        state: 'done',
        ...result,
        message: null,
      });
      if (done && done.readingsAdded > 0 && done.firstTs && done.lastTs) {
        // The shortfall engine replays the imported days (after a short quiet, day by day).
        this.events.emit('readings.accepted', {
          farmId: done.farmId,
          houseId: done.houseId,
          readingsAdded: done.readingsAdded,
          eggsAdded: 0,
          firstTs: done.firstTs,
          lastTs: done.lastTs,
          replayAllDays: true,
        });
      }
    } catch (error) {
      if (error instanceof Cancelled) {
        await this.finish(id, file, {
          state: 'cancelled',
          message: 'Cancelled; readings loaded so far are kept',
        });
      } else if (error instanceof MappingProblem) {
        await this.finish(id, file, { state: 'failed', message: error.message }, true);
      } else {
        this.log(`import ${id} failed`, error);
        await this.finish(
          id,
          file,
          {
            state: 'failed',
            message: 'The import stopped on an unexpected error; it can be run again',
          },
          true,
        );
      }
    }
  }

  private async finish(
    id: number,
    file: string,
    patch: Parameters<typeof updateImport>[2],
    isFileKept = false,
  ): Promise<ImportRow | undefined> {
    const row = await updateImport(this.db, id, { ...patch, finishedAt: new Date() });
    if (row) this.emit(row);
    if (!isFileKept) await removeImportFile(this.db, this.importsDir, file);
    return row;
  }

  private async load(row: ImportRow, file: string, mapping: ImportMapping) {
    const counters = await houseCounters(this.db, row.houseId);
    const delimiter =
      mapping.delimiter ??
      detectDelimiter(
        await readSample(
          await openImportFile(this.db, this.importsDir, file, { firstBytes: 65_536 }),
        ),
      );
    const stream = await openImportFile(this.db, this.importsDir, file);
    const parser = parse({
      delimiter,
      record_delimiter: LINE_ENDINGS,
      bom: true,
      info: true,
      relax_column_count: true,
      relax_quotes: true,
      skip_empty_lines: true,
      skip_records_with_error: true,
      trim: false,
    });
    const errors: LineError[] = [];
    let errorCount = 0;
    let stored = 0;
    const addError = (e: LineError) => {
      errorCount += 1;
      if (stored + errors.length < MAX_STORED_ERRORS) errors.push(e);
    };
    parser.on('skip', (error: Error & { lines?: number }) => {
      addError({ line: error.lines ?? 0, column: null, message: error.message });
    });
    // A file that cannot be read (gone, unreadable) fails the parse, and so the import, instead of throwing
    // from the stream with nobody listening (which would stop the whole API).
    stream.once('error', (error) => parser.destroy(error));
    stream.pipe(parser);

    let linesRead = 0;
    let valid = 0;
    let added = 0;
    let firstTs: Date | null = null;
    let lastTs: Date | null = null;
    let lastReport = Date.now();
    const knownMonths = new Set<string>();
    const lastTotals = new Map<number, { ts: number; total: number }>();

    const report = async () => {
      lastReport = Date.now();
      const batch = errors.splice(0);
      stored += batch.length;
      await insertErrors(this.db, row.id, batch);
      // One statement writes the progress and answers whether someone asked to cancel.
      const updated = await updateImport(this.db, row.id, {
        linesRead,
        readingsAdded: added,
        errorCount,
        bytesRead: stream.bytesRead,
      });
      if (updated?.cancelRequestedAt) throw new Cancelled();
      if (updated) this.emit(updated);
    };

    const decimal: DecimalMark = mapping.decimal;
    const reportMs = this.options.reportMs ?? REPORT_MS;
    const db = this.db;
    let columns: Resolved | null = null;

    async function* lines(): AsyncGenerator<string> {
      for await (const item of parser as AsyncIterable<{ record: string[]; info: Info }>) {
        const { record, info } = item;
        const line = info.lines;
        if (!columns) {
          columns = resolveColumns(mapping, mapping.hasHeader ? record : null, counters);
          if (mapping.hasHeader) continue;
        }
        linesRead += 1;
        for (const reading of readingsOf(
          record,
          line,
          columns,
          mapping,
          decimal,
          counters,
          addError,
        )) {
          let eggs = reading.value;
          let total = '';
          if (mapping.mode === 'total') {
            const previous = lastTotals.get(reading.counterId);
            if (previous && reading.ts.getTime() <= previous.ts) {
              addError({
                line,
                column: reading.column,
                message: 'running totals must be in time order for each counter',
              });
              continue;
            }
            const step = stepFromTotals(previous?.total ?? null, reading.value);
            if (step.kind === 'glitch') {
              addError({
                line,
                column: reading.column,
                message: `the total stepped back from ${previous?.total ?? '?'} to ${reading.value}: read as a glitch, no eggs counted`,
              });
            }
            eggs = step.eggs;
            total = String(reading.value);
            lastTotals.set(reading.counterId, { ts: reading.ts.getTime(), total: step.baseline });
          }
          const month = `${reading.ts.toISOString().slice(0, 7)}-01`;
          if (!knownMonths.has(month)) {
            await ensureReadingPartitions(db, [month]);
            knownMonths.add(month);
          }
          if (!firstTs || reading.ts < firstTs) firstTs = reading.ts;
          if (!lastTs || reading.ts > lastTs) lastTs = reading.ts;
          valid += 1;
          yield `${reading.counterId},${reading.ts.toISOString()},${eggs},${total}`;
        }
        if (Date.now() - lastReport > reportMs) await report();
      }
      if (!columns) throw new MappingProblem('The file holds no lines');
    }

    const result = await copyReadingsInChunks(poolOf(this.db), row.farmId, lines(), {
      chunkRows: this.options.chunkRows ?? 20_000,
      onChunk: (n) => {
        added += n;
      },
    });
    added = result.added;
    const batch = errors.splice(0);
    await insertErrors(this.db, row.id, batch);
    return {
      linesRead,
      readingsAdded: added,
      duplicates: valid - added,
      errorCount,
      bytesRead: stream.bytesRead,
      firstTs,
      lastTs,
    };
  }
}
