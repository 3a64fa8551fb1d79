import {
  importMappingSchema,
  type ImportMapping,
  type ImportStatus,
  type SavedMapping,
} from '@tierscope/contracts';
import { rm } from 'node:fs/promises';
import type { Database } from '@tierscope/db';
import { toCsv } from '@tierscope/domain';
import { farmsWith, requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { housesJudgingPastDays } from '../../platform/cluster.repository';
import { AppError, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import { findHouse } from '../houses/houses.repository';
import type { ImportRunner } from './import-runner';
import {
  deleteMapping,
  errorsOf,
  findImport,
  findMapping,
  insertImport,
  listImports,
  listMappings,
  saveMapping,
  updateImport,
} from './imports.repository';

import { keepUpload } from './import-files';

/** Errors shown with an import's status; the CSV download holds all that were kept. */
const ERRORS_SHOWN = 100;

export interface StoredUpload {
  /** the upload's random name (its pieces in the database are kept under it) */
  storedName: string;
  /** where the upload is on this process's disk until it is kept in the database */
  path: string;
  fileName: string;
  bytes: number;
}

export interface ImportsService {
  start(
    ctx: RequestContext,
    houseId: number,
    upload: StoredUpload,
    mapping: ImportMapping,
  ): Promise<ImportStatus>;
  get(ctx: RequestContext, id: number): Promise<ImportStatus>;
  list(ctx: RequestContext, farmId?: number): Promise<ImportStatus[]>;
  cancel(ctx: RequestContext, id: number): Promise<ImportStatus>;
  /** Runs a failed import again from the start (its file is kept when it fails). */
  retry(ctx: RequestContext, id: number): Promise<ImportStatus>;
  errorsCsv(ctx: RequestContext, id: number): Promise<{ name: string; csv: string }>;
  mappings(ctx: RequestContext, farmId: number): Promise<SavedMapping[]>;
  saveMapping(
    ctx: RequestContext,
    farmId: number,
    name: string,
    mapping: ImportMapping,
  ): Promise<SavedMapping>;
  deleteMapping(ctx: RequestContext, id: number): Promise<void>;
}

type Found = NonNullable<Awaited<ReturnType<typeof findImport>>>;

export function createImportsService(db: Database, runner: ImportRunner): ImportsService {
  async function toStatus(
    found: Found,
    withErrors: boolean,
    judging?: Set<number>,
  ): Promise<ImportStatus> {
    const i = found.import;
    const isDone = i.state === 'done';
    const houses = isDone ? (judging ?? (await housesJudgingPastDays(db, [i.houseId]))) : null;
    return {
      id: i.id,
      farmId: i.farmId,
      houseId: i.houseId,
      houseName: found.houseName,
      fileName: i.fileName,
      bytes: i.bytes,
      state: i.state,
      isJudgingDays: houses?.has(i.houseId) ?? false,
      linesRead: i.linesRead,
      readingsAdded: i.readingsAdded,
      duplicates: i.duplicates,
      errorCount: i.errorCount,
      errors: withErrors ? await errorsOf(db, i.id, ERRORS_SHOWN) : [],
      bytesRead: i.bytesRead,
      firstTs: i.firstTs?.toISOString() ?? null,
      lastTs: i.lastTs?.toISOString() ?? null,
      message: i.message,
      createdBy: found.createdByName,
      createdAt: i.createdAt.toISOString(),
      startedAt: i.startedAt?.toISOString() ?? null,
      finishedAt: i.finishedAt?.toISOString() ?? null,
      mapping: importMappingSchema.parse(i.mapping),
    };
  }

  async function visible(ctx: RequestContext, id: number): Promise<Found> {
    const found = await findImport(db, id);
    if (!found || !ctx.user.roles.has(found.import.farmId)) throw notFound('Import');
    requireFarmPermission(ctx, found.import.farmId, 'imports.run', 'Import');
    return found;
  }

  return {
    async start(ctx, houseId, upload, mapping) {
      // A refusal here leaves no file behind: the route removes the upload of any request that fails.
      const house = await findHouse(db, houseId);
      if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
      requireFarmPermission(ctx, house.farmId, 'imports.run', 'House');
      if (upload.bytes === 0) {
        throw new AppError('validation_failed', 'The file is empty', [
          { path: 'file', message: 'Choose a CSV export with lines in it' },
        ]);
      }
      const row = await db.transaction(async (tx) => {
        const created = await insertImport(tx, {
          farmId: house.farmId,
          houseId: house.id,
          storedName: upload.storedName,
          fileName: upload.fileName.slice(0, 200),
          bytes: upload.bytes,
          mapping,
          createdBy: ctx.user.id,
        });
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: ctx.user.id,
          action: 'import.start',
          entity: 'import',
          entityId: created.id,
          after: { houseId: house.id, fileName: created.fileName, bytes: created.bytes, mapping },
        });
        // The file with its row: any process can run the import, or take it over.
        await keepUpload(tx, upload.path, upload.storedName);
        return created;
      });
      await rm(upload.path, { force: true });
      runner.enqueue(row.id);
      return toStatus({ import: row, houseName: house.name, createdByName: ctx.user.name }, false);
    },

    async get(ctx, id) {
      return toStatus(await visible(ctx, id), true);
    },

    async list(ctx, farmId) {
      let farms = farmsWith(ctx, 'imports.run');
      if (farmId !== undefined) {
        requireFarmPermission(ctx, farmId, 'imports.run');
        farms = [farmId];
      }
      if (farms.length === 0) throw new AppError('forbidden', 'Only integrators and admins import');
      const found = await listImports(db, farms);
      const judging = await housesJudgingPastDays(db, [
        ...new Set(found.map((r) => r.import.houseId)),
      ]);
      return Promise.all(found.map((r) => toStatus(r, false, judging)));
    },

    async cancel(ctx, id) {
      const found = await visible(ctx, id);
      const state = found.import.state;
      if (state === 'done' || state === 'failed' || state === 'cancelled') {
        throw new AppError('conflict', `This import has already ended (${state})`);
      }
      await updateImport(db, id, {
        cancelRequestedAt: new Date(),
        ...(state === 'queued' ? { state: 'cancelled', finishedAt: new Date() } : {}),
      });
      await recordAudit(db, {
        farmId: found.import.farmId,
        actorUserId: ctx.user.id,
        action: 'import.cancel',
        entity: 'import',
        entityId: id,
      });
      return toStatus(await visible(ctx, id), true);
    },

    async retry(ctx, id) {
      const found = await visible(ctx, id);
      if (found.import.state !== 'failed') {
        throw new AppError(
          'conflict',
          `Only a failed import can be run again (this one is ${found.import.state})`,
        );
      }
      await updateImport(db, id, { state: 'queued', cancelRequestedAt: null, message: null });
      await recordAudit(db, {
        farmId: found.import.farmId,
        actorUserId: ctx.user.id,
        action: 'import.retry',
        entity: 'import',
        entityId: id,
      });
      runner.enqueue(id);
      return toStatus(await visible(ctx, id), false);
    },

    async errorsCsv(ctx, id) {
      await visible(ctx, id);
      const errors = await errorsOf(db, id, 1_000_000);
      return {
        name: `import-${id}-errors.csv`,
        csv: toCsv(
          ['line', 'column', 'message'],
          errors.map((e) => [e.line, e.column, e.message]),
        ),
      };
    },

    async mappings(ctx, farmId) {
      requireFarmPermission(ctx, farmId, 'imports.run');
      return (await listMappings(db, farmId)).map((m) => ({
        id: m.id,
        farmId: m.farmId,
        name: m.name,
        mapping: importMappingSchema.parse(m.mapping),
        createdAt: m.createdAt.toISOString(),
      }));
    },

    async saveMapping(ctx, farmId, name, mapping) {
      requireFarmPermission(ctx, farmId, 'imports.run');
      const m = await saveMapping(db, { farmId, name, mapping, createdBy: ctx.user.id });
      return {
        id: m.id,
        farmId: m.farmId,
        name: m.name,
        mapping: importMappingSchema.parse(m.mapping),
        createdAt: m.createdAt.toISOString(),
      };
    },

    async deleteMapping(ctx, id) {
      const m = await findMapping(db, id);
      if (!m || !ctx.user.roles.has(m.farmId)) throw notFound('Mapping');
      requireFarmPermission(ctx, m.farmId, 'imports.run', 'Mapping');
      await deleteMapping(db, id);
    },
  };
}
