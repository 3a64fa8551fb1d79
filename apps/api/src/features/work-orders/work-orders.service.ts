/**
 * Work orders: who may see and change which (role and farm checks), creating from an exception, updating by
 * the pure plan in libs/domain (`planWorkOrderUpdate`), checklist and photos, and the mails each change sends.
 * Views (summary, CSV, mail facts) are in work-order-views.ts; photo storage in work-order-photos.ts.
 */
import { resolve } from 'node:path';
import type {
  Assignee,
  WorkOrder,
  WorkOrderCreateParsed,
  WorkOrdersQuery,
  WorkOrderSummary,
  WorkOrderUpdate,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import {
  allowedTransitions,
  planWorkOrderUpdate,
  can,
  likelyChecks,
  measuredWords,
  FINDING_CAUSE_LABELS,
  type Role,
} from '@tierscope/domain';
import { farmsWith, requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { AppError, forbidden, notFound } from '../../platform/errors';
import { recordAudit } from '../audit/audit.repository';
import { findException } from '../evaluation/exception-rows.repository';
import type { ExceptionsService } from '../exceptions/exceptions.service';
import { findHouse } from '../houses/houses.repository';
import { spotWords } from '../notifications/mail-messages';
import type { Notifier } from '../notifications/notifier';
import {
  addChecklistItems,
  checklistOf,
  exceptionStatusOf,
  farmAssignees,
  findPhoto,
  findWorkOrder,
  insertWorkOrder,
  listWorkOrders,
  photosOf,
  setChecklistItem,
  updateWorkOrder,
  type NewWorkOrder,
} from './work-orders.repository';
import { photoBytes, readPhotos, storePhotos, type UploadedPhoto } from './work-order-photos';
import { forMail, toSummary, workOrdersCsv, type Found } from './work-order-views';

export interface WorkOrdersService {
  list(ctx: RequestContext, query: WorkOrdersQuery): Promise<WorkOrderSummary[]>;
  exportCsv(ctx: RequestContext, query: WorkOrdersQuery): Promise<string>;
  get(ctx: RequestContext, id: number): Promise<WorkOrder>;
  create(ctx: RequestContext, input: WorkOrderCreateParsed): Promise<WorkOrder>;
  update(ctx: RequestContext, id: number, input: WorkOrderUpdate): Promise<WorkOrder>;
  setChecklist(
    ctx: RequestContext,
    id: number,
    itemId: number,
    isChecked: boolean,
  ): Promise<WorkOrder>;
  addPhotos(ctx: RequestContext, id: number, files: UploadedPhoto[]): Promise<WorkOrder>;
  photo(
    ctx: RequestContext,
    id: number,
    photoId: number,
  ): Promise<{ contentType: string; body: Buffer; name: string }>;
  assignees(ctx: RequestContext, farmId: number): Promise<Assignee[]>;
}

export function createWorkOrdersService(options: {
  db: Database;
  notifier: Notifier;
  exceptions: ExceptionsService;
  photosDir: string;
}): WorkOrdersService {
  const { db, notifier, exceptions } = options;
  const photosDir = resolve(options.photosDir);

  /** The order when the caller may see it; another farm's is "not found", another crew member's is 403. */
  async function visible(ctx: RequestContext, id: number): Promise<{ row: Found; role: Role }> {
    const row = await findWorkOrder(db, id);
    const role = row ? ctx.user.roles.get(row.order.farmId) : undefined;
    if (!row || !role) throw notFound('Work order');
    if (can(role, 'workOrders.manage')) return { row, role };
    if (!can(role, 'workOrders.work')) throw forbidden('Your role does not work on work orders');
    if (row.order.assigneeId !== ctx.user.id) {
      throw forbidden('This work order is assigned to someone else');
    }
    return { row, role };
  }

  async function detail(ctx: RequestContext, row: Found, role: Role): Promise<WorkOrder> {
    const o = row.order;
    const [items, photos, exceptionStatus] = await Promise.all([
      checklistOf(db, o.id),
      photosOf(db, o.id),
      o.exceptionId !== null ? exceptionStatusOf(db, o.farmId, o.exceptionId) : null,
    ]);
    const isAssignee = o.assigneeId === ctx.user.id;
    return {
      ...toSummary(row),
      description: o.description,
      tiers: row.tiers,
      timezone: row.timezone,
      createdBy: o.createdBy !== null ? { id: o.createdBy, name: row.creatorName ?? '' } : null,
      findingCause: o.findingCause,
      findingNotes: o.findingNotes,
      cancelReason: o.cancelReason,
      startedAt: o.startedAt?.toISOString() ?? null,
      cancelledAt: o.cancelledAt?.toISOString() ?? null,
      updatedAt: o.updatedAt.toISOString(),
      checklist: items.map(({ item, checkedByName }) => ({
        id: item.id,
        label: item.label,
        isChecked: item.isChecked,
        checkedBy: checkedByName,
        checkedAt: item.checkedAt?.toISOString() ?? null,
      })),
      photos: photos.map(({ photo, uploadedByName }) => ({
        id: photo.id,
        originalName: photo.originalName,
        contentType: photo.contentType,
        bytes: photo.bytes,
        uploadedBy: uploadedByName,
        uploadedAt: photo.uploadedAt.toISOString(),
      })),
      exceptionStatus,
      nextStates: allowedTransitions(o.state, { role, isAssignee }),
      canEdit: can(role, 'workOrders.manage'),
      canWork: can(role, 'workOrders.manage') || isAssignee,
    };
  }

  /** The order as it is now, after a change the caller was just allowed to make. */
  async function fresh(ctx: RequestContext, id: number, role: Role): Promise<WorkOrder> {
    const row = await findWorkOrder(db, id);
    if (!row) throw notFound('Work order');
    return detail(ctx, row, role);
  }

  async function reread(ctx: RequestContext, id: number): Promise<WorkOrder> {
    const { row, role } = await visible(ctx, id);
    return detail(ctx, row, role);
  }

  async function checkAssignee(farmId: number, assigneeId: number | null): Promise<void> {
    if (assigneeId === null) return;
    const people = await farmAssignees(db, farmId);
    if (!people.some((p) => p.id === assigneeId)) {
      throw new AppError('validation_failed', 'The work order is not valid', [
        { path: 'assigneeId', message: 'Choose a crew member, manager or admin of this farm' },
      ]);
    }
  }

  async function listFor(ctx: RequestContext, query: WorkOrdersQuery) {
    const allOfFarms = farmsWith(ctx, 'workOrders.manage');
    const ownOfFarms = farmsWith(ctx, 'workOrders.work').filter((f) => !allOfFarms.includes(f));
    if (allOfFarms.length === 0 && ownOfFarms.length === 0) {
      throw forbidden('Your role does not work on work orders');
    }
    const restrict = (ids: number[]) =>
      query.farmId === undefined ? ids : ids.filter((f) => f === query.farmId);
    if (query.farmId !== undefined) requireFarmPermission(ctx, query.farmId, 'farm.read');
    const rows = await listWorkOrders(db, {
      allOfFarms: restrict(allOfFarms),
      ownOfFarms: restrict(ownOfFarms),
      userId: ctx.user.id,
      ...(query.houseId !== undefined ? { houseId: query.houseId } : {}),
      ...(query.state !== undefined ? { state: query.state } : {}),
      ...(query.assigneeId !== undefined ? { assigneeId: query.assigneeId } : {}),
      ...(query.exceptionId !== undefined ? { exceptionId: query.exceptionId } : {}),
      isMineOnly: query.mine === true,
    });
    const list = rows.map(toSummary);
    return query.overdue === true ? list.filter((o) => o.isOverdue) : list;
  }

  return {
    list: listFor,

    async exportCsv(ctx, query) {
      const list = await listFor(ctx, query);
      return workOrdersCsv(list);
    },

    get: reread,

    async create(ctx, input) {
      let houseId = input.houseId;
      let row = input.row;
      let tier = input.tier;
      let checklist = input.checklist;
      let description = input.description;
      if (input.exceptionId !== undefined) {
        const e = await findException(db, input.exceptionId);
        if (!e || !ctx.user.roles.has(e.farmId)) throw notFound('Exception');
        houseId = e.houseId;
        row = e.scope === 'section' || e.scope === 'row' ? e.row : null;
        tier = e.scope === 'section' || e.scope === 'tier' ? e.tier : null;
        checklist ??= likelyChecks(e.kind, e.scope);
        if (!description) {
          description = `Flagged ${spotWords(e.scope, e.row, e.tier)}: ${measuredWords(e)}.`;
        }
      }
      const house = await findHouse(db, houseId);
      if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
      requireFarmPermission(ctx, house.farmId, 'workOrders.manage', 'House');
      const outside: { path: string; message: string }[] = [];
      if (row !== null && row > house.rows)
        outside.push({ path: 'row', message: `${house.name} has rows 1–${house.rows}` });
      if (tier !== null && tier > house.tiers)
        outside.push({ path: 'tier', message: `${house.name} has tiers 1–${house.tiers}` });
      if (outside.length > 0)
        throw new AppError('validation_failed', 'That spot is not in the house', outside);
      await checkAssignee(house.farmId, input.assigneeId);
      const id = await db.transaction(async (tx) => {
        const values: NewWorkOrder = {
          farmId: house.farmId,
          houseId: house.id,
          row,
          tier,
          exceptionId: input.exceptionId ?? null,
          title: input.title,
          description,
          priority: input.priority,
          assigneeId: input.assigneeId,
          createdBy: ctx.user.id,
          dueOn: input.dueOn,
        };
        const order = await insertWorkOrder(tx, values);
        await addChecklistItems(tx, order.id, checklist ?? []);
        await recordAudit(tx, {
          farmId: house.farmId,
          actorUserId: ctx.user.id,
          action: 'workOrder.create',
          entity: 'work_order',
          entityId: order.id,
          after: { ...values, checklist },
        });
        return order.id;
      });
      const { row: created, role } = await visible(ctx, id);
      if (input.assigneeId !== null) {
        notifier.workOrderAssigned({
          order: forMail(created),
          assigneeId: input.assigneeId,
          by: ctx.user.name,
        });
      }
      return detail(ctx, created, role);
    },

    async update(ctx, id, input) {
      const { row, role } = await visible(ctx, id);
      const o = row.order;
      const plan = planWorkOrderUpdate(
        o,
        input,
        { role, isAssignee: o.assigneeId === ctx.user.id },
        new Date(),
      );
      if ('refused' in plan) {
        if (plan.refused === 'forbidden') throw forbidden(plan.message);
        throw new AppError(
          plan.refused === 'conflict' ? 'conflict' : 'validation_failed',
          plan.message,
          plan.field ? [plan.field] : undefined,
        );
      }
      const { patch, moveTo: next } = plan;
      if (input.assigneeId !== undefined) await checkAssignee(o.farmId, input.assigneeId);
      if (plan.closesException) requireFarmPermission(ctx, o.farmId, 'exceptions.acknowledge');
      await db.transaction(async (tx) => {
        if (Object.keys(patch).length > 0) await updateWorkOrder(tx, id, patch);
        if (input.addChecklist) await addChecklistItems(tx, id, input.addChecklist);
        await recordAudit(tx, {
          farmId: o.farmId,
          actorUserId: ctx.user.id,
          action: next !== null ? `workOrder.${next}` : 'workOrder.update',
          entity: 'work_order',
          entityId: id,
          before: Object.fromEntries(Object.keys(patch).map((k) => [k, o[k as keyof typeof o]])),
          after: { ...patch, ...(input.addChecklist ? { addChecklist: input.addChecklist } : {}) },
        });
      });
      if (input.closeException === true && o.exceptionId !== null) {
        const status = await exceptionStatusOf(db, o.farmId, o.exceptionId);
        if (status !== null && status !== 'closed') {
          const cause = patch.findingCause ?? o.findingCause;
          const notes = patch.findingNotes ?? o.findingNotes;
          await exceptions.close(ctx, o.exceptionId, {
            reason: 'fixed',
            note: `Work order #${id}: ${cause ? FINDING_CAUSE_LABELS[cause] : ''}${notes ? ` — ${notes}` : ''}`.slice(
              0,
              500,
            ),
          });
        }
      }
      // Only managers reassign, and they see every order of the farm: re-read without the access check.
      const after = await findWorkOrder(db, id);
      if (!after) throw notFound('Work order');
      if (
        input.assigneeId !== undefined &&
        input.assigneeId !== null &&
        input.assigneeId !== o.assigneeId
      ) {
        notifier.workOrderAssigned({
          order: forMail(after),
          assigneeId: input.assigneeId,
          by: ctx.user.name,
        });
      }
      if (next === 'done' && o.createdBy !== null && o.createdBy !== ctx.user.id) {
        notifier.workOrderDone({
          order: forMail(after),
          creatorId: o.createdBy,
          by: ctx.user.name,
          cause: after.order.findingCause,
          notes: after.order.findingNotes,
        });
      }
      return detail(ctx, after, role);
    },

    async setChecklist(ctx, id, itemId, isChecked) {
      const { row, role } = await visible(ctx, id);
      if (row.order.state === 'done' || row.order.state === 'cancelled') {
        throw new AppError(
          'conflict',
          'This work order is finished: reopen it to change its checklist',
        );
      }
      // Ticking an item of an open order is starting it: it moves to in progress, as the state machine allows.
      const start =
        isChecked && row.order.state === 'open'
          ? planWorkOrderUpdate(
              row.order,
              { state: 'in_progress' },
              { role, isAssignee: row.order.assigneeId === ctx.user.id },
              new Date(),
            )
          : null;
      const isChanged = await db.transaction(async (tx) => {
        const found = await setChecklistItem(tx, id, itemId, isChecked, ctx.user.id);
        if (!found) return false;
        await recordAudit(tx, {
          farmId: row.order.farmId,
          actorUserId: ctx.user.id,
          action: isChecked ? 'workOrder.check' : 'workOrder.uncheck',
          entity: 'work_order',
          entityId: id,
          after: { itemId, isChecked },
        });
        if (start && !('refused' in start)) {
          await updateWorkOrder(tx, id, start.patch);
          await recordAudit(tx, {
            farmId: row.order.farmId,
            actorUserId: ctx.user.id,
            action: 'workOrder.in_progress',
            entity: 'work_order',
            entityId: id,
            before: { state: row.order.state },
            after: start.patch,
          });
        }
        return true;
      });
      if (!isChanged) throw notFound('Checklist item');
      return fresh(ctx, id, role);
    },

    async addPhotos(ctx, id, files) {
      const { row, role } = await visible(ctx, id);
      if (files.length === 0) {
        throw new AppError('validation_failed', 'Attach at least one photo', [
          { path: 'photos', message: 'No file received' },
        ]);
      }
      await storePhotos(db, row.order, ctx.user.id, await readPhotos(files));
      return fresh(ctx, id, role);
    },

    async photo(ctx, id, photoId) {
      const { row } = await visible(ctx, id);
      const found = await findPhoto(db, id, photoId);
      if (found?.farmId !== row.order.farmId) throw notFound('Photo');
      const body = await photoBytes(db, photosDir, found);
      return { contentType: found.contentType, body, name: found.originalName };
    },

    async assignees(ctx, farmId) {
      requireFarmPermission(ctx, farmId, 'workOrders.manage');
      return farmAssignees(db, farmId);
    },
  };
}
