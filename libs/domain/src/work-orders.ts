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
