import { cleanText } from '@tierscope/contracts';
import { schema, type Database, type Queryable } from '@tierscope/db';
import { and, asc, desc, eq, inArray, sql } from 'drizzle-orm';
import pg from 'pg';

/** What an import's message or a line error keeps of a text taken from the file. */
export const MAX_IMPORT_MESSAGE_LENGTH = 500;
const MAX_COLUMN_NAME_LENGTH = 100;

const {
  imports,
  importErrors,
  importMappings,
  importFileChunks,
  houses,
  users,
  counters,
  sections,
} = schema;

export type ImportRow = typeof imports.$inferSelect;
export type NewImport = typeof imports.$inferInsert;

/** The pool behind drizzle, for the COPY-based bulk path. */
export function poolOf(db: Database): pg.Pool {
  // drizzle() keeps the pool it was given as $client; the Database type (NodePgDatabase) does not name it.
  const client = (db as unknown as { $client?: unknown }).$client;
  if (!(client instanceof pg.Pool)) throw new Error('the database handle has no pg pool');
  return client;
}

export async function insertImport(db: Queryable, values: NewImport): Promise<ImportRow> {
  const [row] = await db.insert(imports).values(values).returning();
  if (!row) throw new Error('import not inserted');
  return row;
}

export async function findImport(db: Queryable, id: number) {
  const [row] = await db
    .select({ import: imports, houseName: houses.name, createdByName: users.name })
    .from(imports)
    .innerJoin(houses, eq(houses.id, imports.houseId))
    .leftJoin(users, eq(users.id, imports.createdBy))
    .where(eq(imports.id, id));
  return row;
}

export async function listImports(db: Queryable, farmIds: number[]) {
  if (farmIds.length === 0) return [];
  return db
    .select({ import: imports, houseName: houses.name, createdByName: users.name })
    .from(imports)
    .innerJoin(houses, eq(houses.id, imports.houseId))
    .leftJoin(users, eq(users.id, imports.createdBy))
    .where(inArray(imports.farmId, farmIds))
    .orderBy(desc(imports.createdAt), desc(imports.id))
    .limit(100);
}

export async function updateImport(
  db: Queryable,
  id: number,
  patch: Partial<NewImport>,
): Promise<ImportRow | undefined> {
  const safe =
    typeof patch.message === 'string'
      ? { ...patch, message: cleanText(patch.message, MAX_IMPORT_MESSAGE_LENGTH) }
      : patch;
  const [row] = await db.update(imports).set(safe).where(eq(imports.id, id)).returning();
  return row;
}

/** Imports a stop left queued or half-way: they are run again from the start (nothing counts twice). */
export async function interruptedImports(db: Queryable): Promise<ImportRow[]> {
  return db
    .select()
    .from(imports)
    .where(inArray(imports.state, ['queued', 'running']))
    .orderBy(asc(imports.id));
}

export async function clearErrors(db: Queryable, importId: number): Promise<void> {
  await db.delete(importErrors).where(eq(importErrors.importId, importId));
}

export async function insertErrors(
  db: Queryable,
  importId: number,
  errors: { line: number; column: string | null; message: string }[],
): Promise<void> {
  if (errors.length === 0) return;
  // Messages quote the file's own cells: cleaned (a NUL would fail the whole insert) and cut short.
  await db.insert(importErrors).values(
    errors.map((e) => ({
      importId,
      line: e.line,
      column: e.column === null ? null : cleanText(e.column, MAX_COLUMN_NAME_LENGTH),
      message: cleanText(e.message, MAX_IMPORT_MESSAGE_LENGTH),
    })),
  );
}

export async function errorsOf(db: Queryable, importId: number, limit: number) {
  return db
    .select({ line: importErrors.line, column: importErrors.column, message: importErrors.message })
    .from(importErrors)
    .where(eq(importErrors.importId, importId))
    .orderBy(asc(importErrors.line))
    .limit(limit);
}

/** A house's counters as an import names them: by external id, and belt counters by (row, tier). */
export async function houseCounters(db: Queryable, houseId: number) {
  const rows = await db
    .select({
      id: counters.id,
      externalId: counters.externalId,
      kind: counters.kind,
      row: sections.row,
      tier: sections.tier,
    })
    .from(counters)
    .leftJoin(sections, eq(sections.id, counters.sectionId))
    .where(and(eq(counters.houseId, houseId), eq(counters.active, true)));
  const byExternalId = new Map(rows.map((r) => [r.externalId, r.id]));
  const bySection = new Map<string, number>();
  for (const r of rows) {
    if (r.kind === 'belt' && r.row !== null && r.tier !== null)
      bySection.set(`${r.row}:${r.tier}`, r.id);
  }
  return { byExternalId, bySection };
}

export async function listMappings(db: Queryable, farmId: number) {
  return db
    .select()
    .from(importMappings)
    .where(eq(importMappings.farmId, farmId))
    .orderBy(asc(importMappings.name));
}

export async function saveMapping(
  db: Queryable,
  values: { farmId: number; name: string; mapping: unknown; createdBy: number },
) {
  const [row] = await db
    .insert(importMappings)
    .values(values)
    .onConflictDoUpdate({
      target: [importMappings.farmId, importMappings.name],
      set: { mapping: values.mapping, createdBy: values.createdBy, createdAt: sql`now()` },
    })
    .returning();
  if (!row) throw new Error('mapping not saved');
  return row;
}

export async function findMapping(db: Queryable, id: number) {
  const [row] = await db.select().from(importMappings).where(eq(importMappings.id, id));
  return row;
}

export async function deleteMapping(db: Queryable, id: number): Promise<void> {
  await db.delete(importMappings).where(eq(importMappings.id, id));
}

/** Keeps one piece of an uploaded file (see import-files.ts). */
export async function insertFileChunk(
  db: Queryable,
  storedName: string,
  seq: number,
  data: Buffer,
): Promise<void> {
  await db.insert(importFileChunks).values({ storedName, seq, data });
}

/** One piece of a kept file, or undefined past its end (or for a file kept on disk). */
export async function findFileChunk(
  db: Queryable,
  storedName: string,
  seq: number,
): Promise<Buffer | undefined> {
  const [row] = await db
    .select({ data: importFileChunks.data })
    .from(importFileChunks)
    .where(and(eq(importFileChunks.storedName, storedName), eq(importFileChunks.seq, seq)));
  return row?.data;
}

export async function deleteFileChunks(db: Queryable, storedName: string): Promise<void> {
  await db.delete(importFileChunks).where(eq(importFileChunks.storedName, storedName));
}
