import type { WorkOrderSummary } from '@tierscope/contracts';
import type { WorkOrderPriority } from '@tierscope/domain';

/** Where a work order is, in plain words. */
export function spotOf(o: Pick<WorkOrderSummary, 'row' | 'tier'>): string {
  if (o.row !== null && o.tier !== null) return `Row ${o.row}, tier ${o.tier}`;
  if (o.row !== null) return `Row ${o.row}, all tiers`;
  if (o.tier !== null) return `Tier ${o.tier}, all rows`;
  return 'Whole house';
}

export const PRIORITY_LABELS: Record<WorkOrderPriority, string> = {
  low: 'Low',
  normal: 'Normal',
  high: 'High',
  urgent: 'Urgent',
};

/** Sort weight: urgent first. */
export const PRIORITY_RANK: Record<WorkOrderPriority, number> = {
  urgent: 0,
  high: 1,
  normal: 2,
  low: 3,
};
