import { randomBytes } from 'node:crypto';
import { mkdirSync, rmSync } from 'node:fs';
import { open } from 'node:fs/promises';
import {
  cleanText,
  findUnsafeInput,
  idParam,
  importMappingSchema,
  MAX_FILE_NAME_LENGTH,
  savedMappingCreateSchema,
} from '@tierscope/contracts';
import { Router, type RequestHandler } from 'express';
import { handleUpload } from '../../platform/uploads';
import multer from 'multer';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { AppError, parseInput } from '../../platform/errors';
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

const listQuery = z.object({ farmId: idParam.optional() });

export function importsRoutes(
  service: ImportsService,
  options: { importsDir: string; maxBytes: number },
): Router {
  const router = Router();
  router.post(
    '/houses/:houseId/imports',
    fileUpload(options.importsDir, options.maxBytes),
    async (req, res) => {
      const file = req.file;
      try {
        const houseId = parseInput(idParam, req.params['houseId'], 'path');
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
        const body = req.body as { mapping?: unknown };
        let raw: unknown;
        try {
          raw = typeof body.mapping === 'string' ? JSON.parse(body.mapping) : body.mapping;
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
        const mapping = parseInput(importMappingSchema, raw, 'mapping');
        res.status(202).json(
          await service.start(
            contextOf(req),
            houseId,
            {
              storedName: file.filename,
              path: file.path,
              fileName: cleanText(file.originalname, MAX_FILE_NAME_LENGTH),
              bytes: file.size,
            },
            mapping,
          ),
        );
      } catch (error) {
        // Anything refused before the import row exists leaves no file behind.
        if (file && !res.headersSent) rmSync(file.path, { force: true });
        throw error;
      }
    },
  );
  router.get('/imports', async (req, res) => {
    const { farmId } = parseInput(listQuery, req.query, 'query');
    res.json(await service.list(contextOf(req), farmId));
  });
  router.get('/imports/:importId', async (req, res) => {
    const id = parseInput(idParam, req.params.importId, 'path');
    res.json(await service.get(contextOf(req), id));
  });
  router.post('/imports/:importId/cancel', async (req, res) => {
    const id = parseInput(idParam, req.params.importId, 'path');
    res.json(await service.cancel(contextOf(req), id));
  });
  router.post('/imports/:importId/retry', async (req, res) => {
    const id = parseInput(idParam, req.params.importId, 'path');
    res.json(await service.retry(contextOf(req), id));
  });
  router.get('/imports/:importId/errors.csv', async (req, res) => {
    const id = parseInput(idParam, req.params.importId, 'path');
    const { name, csv } = await service.errorsCsv(contextOf(req), id);
    res.type('text/csv; charset=utf-8').attachment(name).send(csv);
  });
  router.get('/farms/:farmId/import-mappings', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    res.json(await service.mappings(contextOf(req), farmId));
  });
  router.post('/farms/:farmId/import-mappings', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    const { name, mapping } = parseInput(savedMappingCreateSchema, req.body);
    res.status(201).json(await service.saveMapping(contextOf(req), farmId, name, mapping));
  });
  router.delete('/import-mappings/:mappingId', async (req, res) => {
    const id = parseInput(idParam, req.params.mappingId, 'path');
    await service.deleteMapping(contextOf(req), id);
    res.status(204).end();
  });
  return router;
}
