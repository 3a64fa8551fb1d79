import { createReadStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import type { Database, Queryable } from '@tierscope/db';
import { deleteFileChunks, findFileChunk, insertFileChunk } from './imports.repository';

/** The size of the pieces an uploaded export is kept in. */
const CHUNK_BYTES = 1024 * 1024;

/**
 * Copies an upload from this process's disk into PostgreSQL (in the caller's transaction, beside its import
 * row), so any API process can run the import or take it over. The caller removes the local file.
 */
export async function keepUpload(db: Queryable, path: string, storedName: string): Promise<void> {
  let seq = 0;
  for await (const piece of createReadStream(path, { highWaterMark: CHUNK_BYTES })) {
    await insertFileChunk(db, storedName, seq, piece as Buffer);
    seq += 1;
  }
}

/** A readable file that says how many of its bytes it has read so far (progress). */
export type ImportFileStream = Readable & { readonly bytesRead: number };

/**
 * An import's file as a stream: from PostgreSQL, piece by piece (one piece in memory at a time), or from the
 * imports folder for an import uploaded before files were kept in the database.
 */
export async function openImportFile(
  db: Database,
  importsDir: string,
  storedName: string,
  options: { firstBytes?: number } = {},
): Promise<ImportFileStream> {
  const first = await findFileChunk(db, storedName, 0);
  if (!first) {
    const end = options.firstBytes === undefined ? undefined : options.firstBytes - 1;
    return createReadStream(join(importsDir, storedName), { start: 0, end });
  }
  let sent = 0;
  const limit = options.firstBytes ?? Number.POSITIVE_INFINITY;
  const stream = Readable.from(
    (async function* pieces() {
      for (let seq = 0, piece: Buffer | undefined = first; piece && sent < limit;) {
        const part = piece.subarray(0, Math.max(0, limit - sent));
        sent += part.length;
        yield part;
        seq += 1;
        piece = await findFileChunk(db, storedName, seq);
      }
    })(),
  );
  return Object.defineProperty(stream, 'bytesRead', { get: () => sent }) as ImportFileStream;
}

/** Forgets an import's file, wherever it is kept. */
export async function removeImportFile(
  db: Database,
  importsDir: string,
  storedName: string,
): Promise<void> {
  await deleteFileChunks(db, storedName);
  await rm(join(importsDir, storedName), { force: true });
}
