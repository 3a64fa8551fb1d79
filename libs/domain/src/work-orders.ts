import { localParts } from './production-day';
import type { Role } from './roles';

/** A work order's life: open → in progress → done (findings required) or cancelled (reason required). */
export const WORK_ORDER_STATES = ['open', 'in_progress', 'done', 'cancelled'] as const;
export type WorkOrderState = (typeof WORK_ORDER_STATES)[number];

export const WORK_ORDER_PRIORITIES = ['low', 'normal', 'high', 'urgent'] as const;
export type WorkOrderPriority = (typeof WORK_ORDER_PRIORITIES)[number];

/** What the crew found, as a cause category (plus free notes beside it). */
export const FINDING_CAUSES = [
  'feed',
  'water',
  'nest',
  'lighting',
  'counter',
  'belt_drive',
  'birds_health',
  'other',
] as const;
export type FindingCause = (typeof FINDING_CAUSES)[number];

export const FINDING_CAUSE_LABELS: Record<FindingCause, string> = {
  feed: 'Feed',
  water: 'Water',
  nest: 'Nest',
  lighting: 'Lighting',
  counter: 'Counter',
  belt_drive: 'Belt or drive',
  birds_health: 'Birds or health',
  other: 'Other',
};

export const WORK_ORDER_STATE_LABELS: Record<WorkOrderState, string> = {
  open: 'Open',
  in_progress: 'In progress',
  done: 'Done',
  cancelled: 'Cancelled',
};

/**
 * Which state changes a person may make. The crew member an order is assigned to may start it and mark it
 * done; managers (and admins) may also cancel and reopen. Done and cancelled are ends: only a reopen leaves them.
 */
export function allowedTransitions(
  from: WorkOrderState,
  who: { role: Role; isAssignee: boolean },
): WorkOrderState[] {
  const isManager = who.role === 'manager' || who.role === 'admin';
  const mayWork = isManager || (who.role === 'crew' && who.isAssignee);
  if (!mayWork) return [];
  switch (from) {
    case 'open':
      return isManager ? ['in_progress', 'done', 'cancelled'] : ['in_progress', 'done'];
    case 'in_progress':
      return isManager ? ['open', 'done', 'cancelled'] : ['done'];
    case 'done':
    case 'cancelled':
      return isManager ? ['open'] : [];
  }
}

/** An order is overdue when it is still to do and its due day has passed in the house's own calendar. */
export function isOverdue(
  order: { state: WorkOrderState; dueOn: string | null },
  today: string,
): boolean {
  return (order.state === 'open' || order.state === 'in_progress') && order.dueOn !== null
    ? order.dueOn < today
    : false;
}

export interface SafetyCaution {
  readonly title: string;
  readonly text: string;
}

/**
 * The cautions every work order shows (../shared/TRADE-FACTS.md §6). Lock-out before servicing farmstead
 * equipment is 29 CFR 1928.57(a)(6); the height, ammonia/dust and house-entry items are common practice,
 * with the exposure figures from the sources named there. Local codes and the site's own procedures come first.
 */
export function safetyCautions(location: { tier: number | null; tiers: number }): SafetyCaution[] {
  const cautions: SafetyCaution[] = [
    {
      title: 'Lock out and tag out first',
      text:
        'Before touching egg belts, augers, feed chains or drives: stop the equipment, lock out and tag out ' +
        'its power, wait for all motion to stop and check it cannot start. Keep guards in place and make ' +
        'sure everyone is clear before starting it again (29 CFR 1928.57).',
    },
    {
      title:
        location.tier !== null && location.tier > 1
          ? `Working at height: tier ${location.tier}`
          : 'Working at height',
      text:
        'Reach upper tiers from the service cart or a platform with guardrails. Do not climb the aviary ' +
        'structure, keep three points of contact on ladders and do not work alone on upper tiers.',
    },
    {
      title: 'Ammonia and dust',
      text:
        'Air in a laying house can hold ammonia and dust at harmful levels even when you no longer smell it. ' +
        'Wear the respirator your site provides and step out if your eyes or throat sting.',
    },
    {
      title: 'House entry and biosecurity',
      text:
        "Follow the house-entry steps: the house's own boots and coveralls, tools cleaned and disinfected, " +
        'healthy houses before suspect ones, and note your entry on this work order.',
    },
  ];
  return cautions;
}

export const SAFETY_DEFERRAL =
  "These reminders do not replace local codes or your site's own safety procedures: those come first.";

/** Median of the hours from an exception's opening to its work order's completion, or null when none. */
export function hoursToDone(pairs: readonly { exceptionOpenedAt: Date; doneAt: Date }[]): {
  count: number;
  medianHours: number | null;
  maxHours: number | null;
} {
  const hours = pairs
    .map((p) => (p.doneAt.getTime() - p.exceptionOpenedAt.getTime()) / 3_600_000)
    .filter((h) => Number.isFinite(h) && h >= 0)
    .sort((a, b) => a - b);
  if (hours.length === 0) return { count: 0, medianHours: null, maxHours: null };
  const mid = Math.floor(hours.length / 2);
  const median =
    hours.length % 2 === 1 ? (hours[mid] ?? 0) : ((hours[mid - 1] ?? 0) + (hours[mid] ?? 0)) / 2;
  return { count: hours.length, medianHours: median, maxHours: hours[hours.length - 1] ?? null };
}

/** The calendar date (YYYY-MM-DD) of an instant on a house's wall clock, for due dates. */
export function calendarDayOf(instant: Date, timeZone: string): string {
  const p = localParts(instant, timeZone);
  return `${p.year}-${String(p.month).padStart(2, '0')}-${String(p.day).padStart(2, '0')}`;
}

/** A change asked of a work order (the update body, as the contract parsed it). */
export interface WorkOrderChange {
  title?: string;
  description?: string;
  priority?: WorkOrderPriority;
  assigneeId?: number | null;
  dueOn?: string | null;
  state?: WorkOrderState;
  findingCause?: FindingCause | null;
  findingNotes?: string;
  cancelReason?: string;
  /** with state "done": also close the exception it came from, as fixed */
  closeException?: boolean;
  addChecklist?: readonly string[];
}

/** What the plan reads of the work order as it stands. */
export interface WorkOrderAsIs {
  state: WorkOrderState;
  assigneeId: number | null;
  exceptionId: number | null;
  findingCause: FindingCause | null;
  startedAt: Date | null;
}

/** The columns an update writes. */
export interface WorkOrderPatch {
  title?: string;
  description?: string;
  priority?: WorkOrderPriority;
  assigneeId?: number | null;
  dueOn?: string | null;
  findingCause?: FindingCause | null;
  findingNotes?: string;
  state?: WorkOrderState;
  startedAt?: Date;
  doneAt?: Date | null;
  cancelledAt?: Date | null;
  cancelReason?: string | null;
}

/** Why a change is refused: who may not, what the state does not allow, or a field that is missing. */
export interface WorkOrderRefusal {
  refused: 'forbidden' | 'conflict' | 'invalid';
  message: string;
  field?: { path: string; message: string };
}

export interface WorkOrderPlan {
  patch: WorkOrderPatch;
  /** the state it moves to, or null when it stays */
  moveTo: WorkOrderState | null;
  /** close the exception it came from, as fixed */
  closesException: boolean;
}

const MANAGER_FIELDS = [
  'title',
  'description',
  'priority',
  'assigneeId',
  'dueOn',
  'addChecklist',
] as const;

/**
 * What an update of a work order writes, decided without storage: crew change only findings and the state
 * (as `allowedTransitions` lets them); done needs a finding's cause, cancelled a reason; starting keeps the
 * first start, done sets it if the order was never started, reopening clears done and cancelled. Closing the
 * exception it came from is only for an order from an exception, being marked done.
 */
export function planWorkOrderUpdate(
  order: WorkOrderAsIs,
  change: WorkOrderChange,
  who: { role: Role; isAssignee: boolean },
  now: Date,
): WorkOrderPlan | WorkOrderRefusal {
  const isManager = who.role === 'manager' || who.role === 'admin';
  if (!isManager && MANAGER_FIELDS.some((f) => change[f] !== undefined)) {
    return {
      refused: 'forbidden',
      message: 'Only managers change the order itself; record your findings instead',
    };
  }
  const patch: WorkOrderPatch = {};
  if (change.title !== undefined) patch.title = change.title;
  if (change.description !== undefined) patch.description = change.description;
  if (change.priority !== undefined) patch.priority = change.priority;
  if (change.assigneeId !== undefined) patch.assigneeId = change.assigneeId;
  if (change.dueOn !== undefined) patch.dueOn = change.dueOn;
  if (change.findingCause !== undefined) patch.findingCause = change.findingCause;
  if (change.findingNotes !== undefined) patch.findingNotes = change.findingNotes;

  const next = change.state !== undefined && change.state !== order.state ? change.state : null;
  if (next !== null) {
    if (!allowedTransitions(order.state, who).includes(next)) {
      if (
        !isManager &&
        (next === 'cancelled' || order.state === 'done' || order.state === 'cancelled')
      )
        return { refused: 'forbidden', message: 'Only managers cancel or reopen work orders' };
      return {
        refused: 'conflict',
        message: `A work order that is ${WORK_ORDER_STATE_LABELS[order.state].toLowerCase()} cannot become ${WORK_ORDER_STATE_LABELS[next].toLowerCase()}`,
      };
    }
    patch.state = next;
    if (next === 'in_progress') patch.startedAt = order.startedAt ?? now;
    if (next === 'done') {
      if (!(change.findingCause ?? order.findingCause)) {
        return {
          refused: 'invalid',
          message: 'Record what you found before marking it done',
          field: { path: 'findingCause', message: 'Choose what the cause was' },
        };
      }
      patch.doneAt = now;
      patch.startedAt = order.startedAt ?? now;
    }
    if (next === 'cancelled') {
      if (!change.cancelReason) {
        return {
          refused: 'invalid',
          message: 'Say why the work order is cancelled',
          field: { path: 'cancelReason', message: 'Give a reason' },
        };
      }
      patch.cancelReason = change.cancelReason;
      patch.cancelledAt = now;
    }
    if (next === 'open') {
      patch.doneAt = null;
      patch.cancelledAt = null;
      patch.cancelReason = null;
    }
  }
  const closesException = change.closeException === true;
  if (closesException && (change.state !== 'done' || order.exceptionId === null)) {
    return {
      refused: 'invalid',
      message: 'Only a work order from an exception, being marked done, can close its exception',
      field: { path: 'closeException', message: 'Not possible here' },
    };
  }
  return { patch, moveTo: next, closesException };
}
