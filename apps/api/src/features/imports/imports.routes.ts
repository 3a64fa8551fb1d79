import { randomBytes } from 'node:crypto';
import { mkdirSync, rmSync } from 'node:fs';
import { idParam, importMappingSchema, savedMappingCreateSchema } from '@tierscope/contracts';
import { Router, type RequestHandler } from 'express';
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
  return (req, res, next) => {
    upload(req, res, (error: unknown) => {
      if (!error) {
        next();
        return;
      }
      if (error instanceof multer.MulterError) {
        next(
          error.code === 'LIMIT_FILE_SIZE'
            ? new AppError(
                'payload_too_large',
                `An import file may be at most ${Math.round(maxBytes / 1024 / 1024)} MB`,
              )
            : new AppError('validation_failed', 'The upload is not valid', [
                { path: error.field ?? 'file', message: error.message },
              ]),
        );
        return;
      }
      next(error);
    });
  };
}

const listQuery = z.object({ farmId: z.coerce.number().int().positive().optional() });

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
        const mapping = parseInput(importMappingSchema, raw, 'mapping');
        res.status(202).json(
          await service.start(
            contextOf(req),
            houseId,
            {
              storedName: file.filename,
              fileName: file.originalname,
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
