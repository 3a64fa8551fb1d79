import type { ExceptionKind } from './shortfall';

/** What the baseline rule reads of an exception. */
export interface ExceptionSpan {
  kind: ExceptionKind;
  /** why it was closed (null while open) */
  closeReason: string | null;
  openedAt: Date;
  closedAt: Date | null;
}

/**
 * Whether an exception keeps a production day out of its spots' learned usual level, so a fault is never
 * learned as normal: it was open during that day (`dayStart` to `dayEnd`), and it is a shortfall or a silent
 * counter. A house-level kind (collector gap, house dip) says nothing about one spot, and a spot a person
 * closed as normal for this spot lets its days in (that level is its normal).
 */
export function keepsDayOutOfBaseline(e: ExceptionSpan, dayStart: Date, dayEnd: Date): boolean {
  if (e.closeReason === 'normal_for_spot' || e.kind === 'collector_gap' || e.kind === 'house_dip')
    return false;
  return e.openedAt < dayEnd && (e.closedAt === null || e.closedAt > dayStart);
}
