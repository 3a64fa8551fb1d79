import { z } from 'zod';
import { endpoint } from './endpoint';
import { farmPath, idParam } from './primitives.schema';
import {
  assigneeSchema,
  checklistToggleSchema,
  workOrderCreateSchema,
  workOrderSchema,
  workOrderSummarySchema,
  workOrderUpdateSchema,
  workOrdersQuerySchema,
} from './work-order.schema';

/** How many photos one upload may carry. */
export const MAX_PHOTOS_PER_UPLOAD = 6;

const orderPath = z.object({ workOrderId: idParam });

export const workOrdersEndpoints = {
  list: endpoint({
    method: 'get',
    path: '/work-orders',
    summary:
      'Work orders: all of a farm for managers and admins, their own for crew (filters: farm, house, state or "active", assignee, mine, overdue, exception)',
    permission: 'workOrders.work',
    query: workOrdersQuerySchema,
    answer: z.array(workOrderSummarySchema),
  }),
  exportCsv: endpoint({
    method: 'get',
    path: '/work-orders/export.csv',
    summary: 'The same list as CSV (cells starting with = + - @ are escaped)',
    permission: 'workOrders.work',
    query: workOrdersQuerySchema,
    answer: 'text/csv',
  }),
  create: endpoint({
    method: 'post',
    path: '/work-orders',
    summary: 'Open a work order by hand or from an exception (exceptionId)',
    permission: 'workOrders.manage',
    body: workOrderCreateSchema,
    status: 201,
    answer: workOrderSchema,
  }),
  get: endpoint({
    method: 'get',
    path: '/work-orders/:workOrderId',
    summary: 'One work order with its checklist, photos and what the caller may do',
    permission: 'workOrders.work',
    params: orderPath,
    answer: workOrderSchema,
  }),
  update: endpoint({
    method: 'patch',
    path: '/work-orders/:workOrderId',
    summary:
      'Change a work order: fields (managers), state (open → in progress → done with findings, or cancelled with a reason; reopen by managers), findings',
    permission: 'workOrders.work',
    params: orderPath,
    body: workOrderUpdateSchema,
    answer: workOrderSchema,
    errors: { 409: 'Not possible from its state' },
  }),
  setChecklistItem: endpoint({
    method: 'patch',
    path: '/work-orders/:workOrderId/checklist/:itemId',
    summary: 'Tick or untick a checklist item',
    permission: 'workOrders.work',
    params: orderPath.extend({ itemId: idParam }),
    body: checklistToggleSchema,
    answer: workOrderSchema,
  }),
  addPhotos: endpoint({
    method: 'post',
    path: '/work-orders/:workOrderId/photos',
    summary:
      'Attach photos (multipart field "photos", up to 6; JPEG, PNG or WebP judged by content; size limit PHOTO_MAX_BYTES)',
    permission: 'workOrders.work',
    params: orderPath,
    upload: z.object({ photos: z.array(z.file()).max(MAX_PHOTOS_PER_UPLOAD) }),
    status: 201,
    answer: workOrderSchema,
    errors: { 413: 'A photo over the size limit' },
  }),
  photo: endpoint({
    method: 'get',
    path: '/work-orders/:workOrderId/photos/:photoId',
    summary: 'A photo, to people who may see its work order',
    permission: 'workOrders.work',
    params: orderPath.extend({ photoId: idParam }),
    answer: 'image/*',
  }),
  assignees: endpoint({
    method: 'get',
    path: '/farms/:farmId/assignees',
    summary: 'People of a farm a work order can be assigned to',
    permission: 'workOrders.manage',
    params: farmPath,
    answer: z.array(assigneeSchema),
  }),
};
