import { FINDING_CAUSES, WORK_ORDER_PRIORITIES, WORK_ORDER_STATES } from '@tierscope/domain';
import { z } from 'zod';
import { calendarDay, dbId, idParam } from './primitives.schema';

const location = {
  houseId: dbId,
  row: z.number().int().min(1, 'Rows are numbered from 1').max(200).nullable().default(null),
  tier: z.number().int().min(1, 'Tiers are numbered from 1').max(12).nullable().default(null),
};
const title = z.string().trim().min(3, 'Give the work order a title').max(160);
const checklistLabel = z.string().trim().min(1, 'A checklist item needs words').max(200);
const dueOn = calendarDay('Due is a date such as 2026-12-24').nullable();

export const workOrderCreateSchema = z.object({
  ...location,
  title,
  description: z.string().trim().max(4000).default(''),
  priority: z.enum(WORK_ORDER_PRIORITIES).default('normal'),
  assigneeId: dbId.nullable().default(null),
  dueOn: dueOn.default(null),
  /** when opened from an exception: the house, spot and checklist come from it */
  exceptionId: dbId.optional(),
  checklist: z.array(checklistLabel).max(40).optional(),
});
export type WorkOrderCreate = z.input<typeof workOrderCreateSchema>;
export type WorkOrderCreateParsed = z.output<typeof workOrderCreateSchema>;

export const workOrderUpdateSchema = z
  .object({
    title,
    description: z.string().trim().max(4000),
    priority: z.enum(WORK_ORDER_PRIORITIES),
    assigneeId: dbId.nullable(),
    dueOn,
    state: z.enum(WORK_ORDER_STATES),
    findingCause: z.enum(FINDING_CAUSES).nullable(),
    findingNotes: z.string().trim().max(4000),
    cancelReason: z.string().trim().min(3, 'Say why the work order is cancelled').max(500),
    /** with state "done": also close the exception it came from, as fixed */
    closeException: z.boolean(),
    addChecklist: z.array(checklistLabel).min(1).max(20),
  })
  .partial()
  .refine((value) => Object.keys(value).length > 0, 'Send at least one field to change');
export type WorkOrderUpdate = z.infer<typeof workOrderUpdateSchema>;

export const checklistToggleSchema = z.object({ isChecked: z.boolean() });
export type ChecklistToggle = z.infer<typeof checklistToggleSchema>;

export const workOrdersQuerySchema = z.object({
  farmId: idParam.optional(),
  houseId: idParam.optional(),
  state: z.enum([...WORK_ORDER_STATES, 'active']).optional(),
  assigneeId: idParam.optional(),
  /** only what is assigned to the caller ("My work") */
  mine: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
  overdue: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
  exceptionId: idParam.optional(),
});
export type WorkOrdersQuery = z.infer<typeof workOrdersQuerySchema>;

const personSchema = z.object({ id: z.number().int(), name: z.string() }).nullable();

export const checklistItemSchema = z.object({
  id: z.number().int(),
  label: z.string(),
  isChecked: z.boolean(),
  checkedBy: z.string().nullable(),
  checkedAt: z.iso.datetime().nullable(),
});
export type ChecklistItem = z.infer<typeof checklistItemSchema>;

export const workOrderPhotoSchema = z.object({
  id: z.number().int(),
  originalName: z.string(),
  contentType: z.string(),
  bytes: z.number().int(),
  uploadedBy: z.string().nullable(),
  uploadedAt: z.iso.datetime(),
});
export type WorkOrderPhoto = z.infer<typeof workOrderPhotoSchema>;

export const workOrderSummarySchema = z.object({
  id: z.number().int(),
  farmId: z.number().int(),
  farmName: z.string(),
  houseId: z.number().int(),
  houseName: z.string(),
  row: z.number().int().nullable(),
  tier: z.number().int().nullable(),
  title: z.string(),
  priority: z.enum(WORK_ORDER_PRIORITIES),
  state: z.enum(WORK_ORDER_STATES),
  assignee: personSchema,
  dueOn: z.string().nullable(),
  isOverdue: z.boolean(),
  exceptionId: z.number().int().nullable(),
  checklistDone: z.number().int(),
  checklistTotal: z.number().int(),
  createdAt: z.iso.datetime(),
  doneAt: z.iso.datetime().nullable(),
});
export type WorkOrderSummary = z.infer<typeof workOrderSummarySchema>;

export const workOrderSchema = workOrderSummarySchema.extend({
  description: z.string(),
  tiers: z.number().int(),
  timezone: z.string(),
  createdBy: personSchema,
  findingCause: z.enum(FINDING_CAUSES).nullable(),
  findingNotes: z.string(),
  cancelReason: z.string().nullable(),
  startedAt: z.iso.datetime().nullable(),
  cancelledAt: z.iso.datetime().nullable(),
  updatedAt: z.iso.datetime(),
  checklist: z.array(checklistItemSchema),
  photos: z.array(workOrderPhotoSchema),
  exceptionStatus: z.enum(['open', 'acknowledged', 'closed']).nullable(),
  /** the states the caller may move it to */
  nextStates: z.array(z.enum(WORK_ORDER_STATES)),
  /** what the caller may change */
  canEdit: z.boolean(),
  canWork: z.boolean(),
});
export type WorkOrder = z.infer<typeof workOrderSchema>;

/** People of a farm a work order can be assigned to. */
export const assigneeSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  role: z.string(),
});
export type Assignee = z.infer<typeof assigneeSchema>;

export const workOrderReportQuerySchema = z.object({
  farmId: idParam,
  from: calendarDay('from is a date such as 2026-11-01').optional(),
  to: calendarDay('to is a date such as 2026-11-30').optional(),
});
export type WorkOrderReportQuery = z.infer<typeof workOrderReportQuerySchema>;

export const workOrderReportSchema = z.object({
  farmId: z.number().int(),
  from: z.string(),
  to: z.string(),
  houses: z.array(
    z.object({
      houseId: z.number().int(),
      houseName: z.string(),
      done: z.number().int(),
      fromExceptions: z.number().int(),
      medianHoursToDone: z.number().nullable(),
      maxHoursToDone: z.number().nullable(),
      byCause: z.record(z.enum(FINDING_CAUSES), z.number().int()),
    }),
  ),
});
export type WorkOrderReport = z.infer<typeof workOrderReportSchema>;
