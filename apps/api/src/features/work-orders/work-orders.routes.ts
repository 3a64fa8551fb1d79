import { cleanText, MAX_FILE_NAME_LENGTH } from '@tierscope/contracts';
import { endpoints } from '@tierscope/contracts';
import type { RequestHandler } from 'express';
import { handleUpload } from '../../platform/uploads';
import multer from 'multer';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
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

export function workOrdersRoutes(service: WorkOrdersService, photoMaxBytes: number) {
  return declareRoutes('Work orders', [
    route({
      ...endpoints.workOrders.list,
      handle: ({ req, query }) => service.list(contextOf(req), query),
    }),
    route({
      ...endpoints.workOrders.exportCsv,
      handle: async ({ req, res, query }) => {
        const csv = await service.exportCsv(contextOf(req), query);
        res.type('text/csv; charset=utf-8').attachment('work-orders.csv').send(csv);
      },
    }),
    route({
      ...endpoints.workOrders.create,
      handle: ({ req, body }) => service.create(contextOf(req), body),
    }),
    route({
      ...endpoints.workOrders.get,
      handle: ({ req, params }) => service.get(contextOf(req), params.workOrderId),
    }),
    route({
      ...endpoints.workOrders.update,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.workOrderId, body),
    }),
    route({
      ...endpoints.workOrders.setChecklistItem,
      handle: ({ req, params, body }) =>
        service.setChecklist(contextOf(req), params.workOrderId, params.itemId, body.isChecked),
    }),
    route({
      ...endpoints.workOrders.addPhotos,
      before: [photoUpload(photoMaxBytes)],
      handle: ({ req, params }) => {
        const files = (Array.isArray(req.files) ? req.files : []).map((f) => ({
          originalName: cleanText(f.originalname, MAX_FILE_NAME_LENGTH),
          buffer: f.buffer,
        }));
        return service.addPhotos(contextOf(req), params.workOrderId, files);
      },
    }),
    route({
      ...endpoints.workOrders.photo,
      handle: async ({ req, res, params }) => {
        const photo = await service.photo(contextOf(req), params.workOrderId, params.photoId);
        res
          .type(photo.contentType)
          .set('Cache-Control', 'private, max-age=3600')
          .set('Content-Disposition', `inline; filename="photo-${params.photoId}"`)
          .send(photo.body);
      },
    }),
    route({
      ...endpoints.workOrders.assignees,
      handle: ({ req, params }) => service.assignees(contextOf(req), params.farmId),
    }),
  ]);
}
