import {
  checklistToggleSchema,
  cleanText,
  idParam,
  MAX_FILE_NAME_LENGTH,
  workOrderCreateSchema,
  workOrderReportQuerySchema,
  workOrdersQuerySchema,
  workOrderUpdateSchema,
} from '@tierscope/contracts';
import { Router, type RequestHandler } from 'express';
import { handleUpload } from '../../platform/uploads';
import multer from 'multer';
import { contextOf } from '../../platform/auth';
import { parseInput } from '../../platform/errors';
import type { WorkOrdersService } from './work-orders.service';

export const MAX_PHOTOS_PER_UPLOAD = 6;

/** Multipart photos held in memory (they are small and checked by content before anything is written). */
function photoUpload(maxBytes: number): RequestHandler {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: maxBytes, files: MAX_PHOTOS_PER_UPLOAD, fields: 5 },
  }).array('photos', MAX_PHOTOS_PER_UPLOAD);
  return handleUpload(upload, {
    field: 'photos',
    tooLarge: `A photo may be at most ${(maxBytes / 1024 / 1024).toFixed(0)} MB`,
    tooMany: `Send up to ${MAX_PHOTOS_PER_UPLOAD} photos in the field "photos"`,
  });
}

export function workOrdersRoutes(service: WorkOrdersService, photoMaxBytes: number): Router {
  const router = Router();
  router.get('/work-orders', async (req, res) => {
    res.json(
      await service.list(contextOf(req), parseInput(workOrdersQuerySchema, req.query, 'query')),
    );
  });
  router.get('/work-orders/export.csv', async (req, res) => {
    const csv = await service.exportCsv(
      contextOf(req),
      parseInput(workOrdersQuerySchema, req.query, 'query'),
    );
    res.type('text/csv; charset=utf-8').attachment('work-orders.csv').send(csv);
  });
  router.post('/work-orders', async (req, res) => {
    res
      .status(201)
      .json(await service.create(contextOf(req), parseInput(workOrderCreateSchema, req.body)));
  });
  router.get('/work-orders/:workOrderId', async (req, res) => {
    const id = parseInput(idParam, req.params.workOrderId, 'path');
    res.json(await service.get(contextOf(req), id));
  });
  router.patch('/work-orders/:workOrderId', async (req, res) => {
    const id = parseInput(idParam, req.params.workOrderId, 'path');
    res.json(await service.update(contextOf(req), id, parseInput(workOrderUpdateSchema, req.body)));
  });
  router.patch('/work-orders/:workOrderId/checklist/:itemId', async (req, res) => {
    const id = parseInput(idParam, req.params.workOrderId, 'path');
    const itemId = parseInput(idParam, req.params.itemId, 'path');
    const { isChecked } = parseInput(checklistToggleSchema, req.body);
    res.json(await service.setChecklist(contextOf(req), id, itemId, isChecked));
  });
  router.post('/work-orders/:workOrderId/photos', photoUpload(photoMaxBytes), async (req, res) => {
    const id = parseInput(idParam, req.params['workOrderId'], 'path');
    const files = (Array.isArray(req.files) ? req.files : []).map((f) => ({
      originalName: cleanText(f.originalname, MAX_FILE_NAME_LENGTH),
      buffer: f.buffer,
    }));
    res.status(201).json(await service.addPhotos(contextOf(req), id, files));
  });
  router.get('/work-orders/:workOrderId/photos/:photoId', async (req, res) => {
    const id = parseInput(idParam, req.params.workOrderId, 'path');
    const photoId = parseInput(idParam, req.params.photoId, 'path');
    const photo = await service.photo(contextOf(req), id, photoId);
    res
      .type(photo.contentType)
      .set('Cache-Control', 'private, max-age=3600')
      .set('Content-Disposition', `inline; filename="photo-${photoId}"`)
      .send(photo.body);
  });
  router.get('/farms/:farmId/assignees', async (req, res) => {
    const farmId = parseInput(idParam, req.params.farmId, 'path');
    res.json(await service.assignees(contextOf(req), farmId));
  });
  router.get('/reports/work-orders', async (req, res) => {
    res.json(
      await service.report(
        contextOf(req),
        parseInput(workOrderReportQuerySchema, req.query, 'query'),
      ),
    );
  });
  return router;
}
