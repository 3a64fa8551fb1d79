import {
  assigneeSchema,
  checklistToggleSchema,
  farmPath,
  workOrderSchema,
  workOrderSummarySchema,
  cleanText,
  idParam,
  MAX_FILE_NAME_LENGTH,
  workOrderCreateSchema,
  workOrdersQuerySchema,
  workOrderUpdateSchema,
} from '@tierscope/contracts';
import type { RequestHandler } from 'express';
import { z } from 'zod';
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

const orderPath = z.object({ workOrderId: idParam });

export function workOrdersRoutes(service: WorkOrdersService, photoMaxBytes: number) {
  return declareRoutes('Work orders', [
    route({
      method: 'get',
      path: '/work-orders',
      summary:
        'Work orders: all of a farm for managers and admins, their own for crew (filters: farm, house, state or "active", assignee, mine, overdue, exception)',
      query: workOrdersQuerySchema,
      answer: z.array(workOrderSummarySchema),
      handle: ({ req, query }) => service.list(contextOf(req), query),
    }),
    route({
      method: 'get',
      path: '/work-orders/export.csv',
      summary: 'The same list as CSV (cells starting with = + - @ are escaped)',
      query: workOrdersQuerySchema,
      answer: 'text/csv',
      handle: async ({ req, res, query }) => {
        const csv = await service.exportCsv(contextOf(req), query);
        res.type('text/csv; charset=utf-8').attachment('work-orders.csv').send(csv);
      },
    }),
    route({
      method: 'post',
      path: '/work-orders',
      summary: 'Open a work order by hand or from an exception (exceptionId)',
      body: workOrderCreateSchema,
      status: 201,
      answer: workOrderSchema,
      handle: ({ req, body }) => service.create(contextOf(req), body),
    }),
    route({
      method: 'get',
      path: '/work-orders/:workOrderId',
      summary: 'One work order with its checklist, photos and what the caller may do',
      params: orderPath,
      answer: workOrderSchema,
      handle: ({ req, params }) => service.get(contextOf(req), params.workOrderId),
    }),
    route({
      method: 'patch',
      path: '/work-orders/:workOrderId',
      summary:
        'Change a work order: fields (managers), state (open → in progress → done with findings, or cancelled with a reason; reopen by managers), findings',
      params: orderPath,
      body: workOrderUpdateSchema,
      answer: workOrderSchema,
      errors: { 409: 'Not possible from its state' },
      handle: ({ req, params, body }) => service.update(contextOf(req), params.workOrderId, body),
    }),
    route({
      method: 'patch',
      path: '/work-orders/:workOrderId/checklist/:itemId',
      summary: 'Tick or untick a checklist item',
      params: orderPath.extend({ itemId: idParam }),
      body: checklistToggleSchema,
      answer: workOrderSchema,
      handle: ({ req, params, body }) =>
        service.setChecklist(contextOf(req), params.workOrderId, params.itemId, body.isChecked),
    }),
    route({
      method: 'post',
      path: '/work-orders/:workOrderId/photos',
      summary:
        'Attach photos (multipart field "photos", up to 6; JPEG, PNG or WebP judged by content; size limit PHOTO_MAX_BYTES)',
      params: orderPath,
      upload: z.object({ photos: z.array(z.file()).max(MAX_PHOTOS_PER_UPLOAD) }),
      before: [photoUpload(photoMaxBytes)],
      status: 201,
      answer: workOrderSchema,
      errors: { 413: 'A photo over the size limit' },
      handle: ({ req, params }) => {
        const files = (Array.isArray(req.files) ? req.files : []).map((f) => ({
          originalName: cleanText(f.originalname, MAX_FILE_NAME_LENGTH),
          buffer: f.buffer,
        }));
        return service.addPhotos(contextOf(req), params.workOrderId, files);
      },
    }),
    route({
      method: 'get',
      path: '/work-orders/:workOrderId/photos/:photoId',
      summary: 'A photo, to people who may see its work order',
      params: orderPath.extend({ photoId: idParam }),
      answer: 'image/*',
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
      method: 'get',
      path: '/farms/:farmId/assignees',
      summary: 'People of a farm a work order can be assigned to',
      params: farmPath,
      answer: z.array(assigneeSchema),
      handle: ({ req, params }) => service.assignees(contextOf(req), params.farmId),
    }),
  ]);
}
