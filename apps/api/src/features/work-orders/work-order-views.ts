import type { WorkOrderSummary } from '@tierscope/contracts';
import { calendarDayOf, isOverdue, toCsv, WORK_ORDER_STATE_LABELS } from '@tierscope/domain';
import type { findWorkOrder } from './work-orders.repository';

/** How a stored work order is shown: the list's summary, the mails' few facts, the CSV export. */
export type Found = NonNullable<Awaited<ReturnType<typeof findWorkOrder>>>;

/** "3/5" as the repository counts a checklist. */
function counts(text: string): { done: number; total: number } {
  const [done, total] = text.split('/').map(Number);
  return { done: done ?? 0, total: total ?? 0 };
}

/** One line of the work-order list, as every list and the CSV show it. */
export function toSummary(r: Found): WorkOrderSummary {
  const o = r.order;
  const checklist = counts(r.checklist);
  return {
    id: o.id,
    farmId: o.farmId,
    farmName: r.farmName,
    houseId: o.houseId,
    houseName: r.houseName,
    row: o.row,
    tier: o.tier,
    title: o.title,
    priority: o.priority,
    state: o.state,
    assignee: o.assigneeId !== null ? { id: o.assigneeId, name: r.assigneeName ?? '' } : null,
    dueOn: o.dueOn,
    isOverdue: isOverdue(o, calendarDayOf(new Date(), r.timezone)),
    exceptionId: o.exceptionId,
    checklistDone: checklist.done,
    checklistTotal: checklist.total,
    createdAt: o.createdAt.toISOString(),
    doneAt: o.doneAt?.toISOString() ?? null,
  };
}

/** What a mail says of a work order. */
export function forMail(row: Found) {
  return {
    id: row.order.id,
    title: row.order.title,
    farmName: row.farmName,
    houseName: row.houseName,
    row: row.order.row,
    tier: row.order.tier,
    priority: row.order.priority,
    dueOn: row.order.dueOn,
  };
}

/** The list as CSV, with the states in words (cells starting with = + - @ are escaped by toCsv). */
export function workOrdersCsv(list: readonly WorkOrderSummary[]): string {
  return toCsv(
    [
      'id',
      'farm',
      'house',
      'row',
      'tier',
      'title',
      'priority',
      'state',
      'assignee',
      'due',
      'overdue',
      'checklist',
      'created',
      'done',
    ],
    list.map((o) => [
      o.id,
      o.farmName,
      o.houseName,
      o.row,
      o.tier,
      o.title,
      o.priority,
      WORK_ORDER_STATE_LABELS[o.state],
      o.assignee?.name ?? '',
      o.dueOn,
      o.isOverdue ? 'yes' : 'no',
      `${o.checklistDone} of ${o.checklistTotal}`,
      o.createdAt,
      o.doneAt,
    ]),
  );
}
