import { randomBytes } from 'node:crypto';
import { mkdirSync, rmSync } from 'node:fs';
import { open } from 'node:fs/promises';
import {
  cleanText,
  findUnsafeInput,
  importMappingSchema,
  MAX_FILE_NAME_LENGTH,
} from '@tierscope/contracts';
import { endpoints } from '@tierscope/contracts';
import type { RequestHandler } from 'express';
import { handleUpload } from '../../platform/uploads';
import multer from 'multer';
import { contextOf } from '../../platform/auth';
import { AppError, parseInput } from '../../platform/errors';
import { declareRoutes, route } from '../../platform/route';
import type { ImportsService } from './imports.service';

/**
 * The CSV streamed straight to disk under a random name (never held in memory), with a size limit; the
 * mapping arrives as a JSON text field beside it.
 */
function fileUpload(dir: string, maxBytes: number): RequestHandler {
  mkdirSync(dir, { recursive: true });
  const upload = multer({
    storage: multer.diskStorage({
      destination: dir,
      filename: (_req, _file, done) => {
        done(null, `${randomBytes(16).toString('hex')}.csv`);
      },
    }),
    limits: { fileSize: maxBytes, files: 1, fields: 4, fieldSize: 256 * 1024 },
  }).single('file');
  return handleUpload(upload, {
    field: 'file',
    tooLarge: `An import file may be at most ${Math.round(maxBytes / 1024 / 1024)} MB`,
  });
}

/** How much of an upload is read to tell text from binary before anything is queued. */
const TEXT_SNIFF_BYTES = 64 * 1024;

/**
 * Whether the file starts like a text export: valid UTF-8 with at most a stray NUL byte (binary files, and
 * UTF-16 exports, which the parser would read as garbage, both fail).
 */
async function looksLikeText(path: string): Promise<boolean> {
  const handle = await open(path, 'r');
  try {
    const buffer = Buffer.alloc(TEXT_SNIFF_BYTES);
    const { bytesRead } = await handle.read(buffer, 0, TEXT_SNIFF_BYTES, 0);
    const sample = buffer.subarray(0, bytesRead);
    // A NUL in a cell is that line's error; many (UTF-16 text, binary files) mean it is not a text export.
    let nulBytes = 0;
    for (const byte of sample) if (byte === 0) nulBytes += 1;
    if (nulBytes > Math.max(4, sample.length / 100)) return false;
    // stream: true lets a character cut by the sample's end pass; a real bad byte still throws.
    new TextDecoder('utf-8', { fatal: true }).decode(sample, { stream: true });
    return true;
  } catch {
    // fatal decoding found bytes that are not UTF-8
    return false;
  } finally {
    await handle.close();
  }
}

/** The mapping sent as JSON text beside the file, parsed and checked like any body. */
function parseMapping(text: unknown) {
  let raw: unknown;
  try {
    raw = typeof text === 'string' ? JSON.parse(text) : text;
  } catch {
    // Bad JSON is the caller's input error, said in the one error shape.
    throw new AppError('validation_failed', 'The mapping is not valid JSON', [
      { path: 'mapping', message: 'Malformed JSON' },
    ]);
  }
  const unsafe = findUnsafeInput(raw);
  if (unsafe) {
    throw new AppError('validation_failed', 'The mapping is not valid', [
      { path: `mapping.${unsafe.path}`, message: unsafe.message },
    ]);
  }
  return parseInput(importMappingSchema, raw, 'mapping');
}

export function importsRoutes(
  service: ImportsService,
  options: { importsDir: string; maxBytes: number },
) {
  return declareRoutes('Imports', [
    route({
      ...endpoints.imports.start,
      before: [fileUpload(options.importsDir, options.maxBytes)],
      // Anything refused before the import row exists leaves no file behind.
      release: (req) => {
        if (req.file) rmSync(req.file.path, { force: true });
      },
      handle: async ({ req, params }) => {
        const file = req.file;
        if (!file) {
          throw new AppError('validation_failed', 'Attach the CSV export as the field "file"', [
            { path: 'file', message: 'No file received' },
          ]);
        }
        if (!(await looksLikeText(file.path))) {
          throw new AppError(
            'unsupported_media_type',
            'This file is not a text (CSV) export: save it as CSV in UTF-8 and try again',
          );
        }
        const mapping = parseMapping((req.body as { mapping?: unknown }).mapping);
        return service.start(
          contextOf(req),
          params.houseId,
          {
            storedName: file.filename,
            path: file.path,
            fileName: cleanText(file.originalname, MAX_FILE_NAME_LENGTH),
            bytes: file.size,
          },
          mapping,
        );
      },
    }),
    route({
      ...endpoints.imports.list,
      handle: ({ req, query }) => service.list(contextOf(req), query.farmId),
    }),
    route({
      ...endpoints.imports.get,
      handle: ({ req, params }) => service.get(contextOf(req), params.importId),
    }),
    route({
      ...endpoints.imports.cancel,
      handle: ({ req, params }) => service.cancel(contextOf(req), params.importId),
    }),
    route({
      ...endpoints.imports.retry,
      handle: ({ req, params }) => service.retry(contextOf(req), params.importId),
    }),
    route({
      ...endpoints.imports.errorsCsv,
      handle: async ({ req, res, params }) => {
        const { name, csv } = await service.errorsCsv(contextOf(req), params.importId);
        res.type('text/csv; charset=utf-8').attachment(name).send(csv);
      },
    }),
    route({
      ...endpoints.imports.mappings,
      handle: ({ req, params }) => service.mappings(contextOf(req), params.farmId),
    }),
    route({
      ...endpoints.imports.saveMapping,
      handle: ({ req, params, body }) =>
        service.saveMapping(contextOf(req), params.farmId, body.name, body.mapping),
    }),
    route({
      ...endpoints.imports.deleteMapping,
      handle: ({ req, params }) => service.deleteMapping(contextOf(req), params.mappingId),
    }),
  ]);
}
