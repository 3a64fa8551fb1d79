import { describe, expect, it } from 'vitest';
import { keepsDayOutOfBaseline, type ExceptionSpan } from './baseline';

const dayStart = new Date('2026-11-10T05:00:00Z');
const dayEnd = new Date('2026-11-11T05:00:00Z');
const span = (over: Partial<ExceptionSpan>): ExceptionSpan => ({
  kind: 'shortfall',
  closeReason: null,
  openedAt: new Date('2026-11-09T12:00:00Z'),
  closedAt: null,
  ...over,
});

describe('keepsDayOutOfBaseline', () => {
  it('keeps out a day a shortfall or silent counter was open on, however briefly', () => {
    expect(keepsDayOutOfBaseline(span({}), dayStart, dayEnd)).toBe(true);
    expect(keepsDayOutOfBaseline(span({ kind: 'silent_counter' }), dayStart, dayEnd)).toBe(true);
    const brief = span({
      openedAt: new Date('2026-11-11T04:00:00Z'),
      closedAt: new Date('2026-11-11T04:30:00Z'),
      closeReason: 'fixed',
    });
    expect(keepsDayOutOfBaseline(brief, dayStart, dayEnd)).toBe(true);
  });

  it('lets in days before it opened and after it closed', () => {
    const later = span({ openedAt: dayEnd });
    expect(keepsDayOutOfBaseline(later, dayStart, dayEnd)).toBe(false);
    const closedBefore = span({ closedAt: dayStart, closeReason: 'recovered' });
    expect(keepsDayOutOfBaseline(closedBefore, dayStart, dayEnd)).toBe(false);
  });

  it('lets in the days of a spot closed as normal for it, and of house-level kinds', () => {
    expect(
      keepsDayOutOfBaseline(
        span({ closeReason: 'normal_for_spot', closedAt: dayEnd }),
        dayStart,
        dayEnd,
      ),
    ).toBe(false);
    expect(keepsDayOutOfBaseline(span({ kind: 'collector_gap' }), dayStart, dayEnd)).toBe(false);
    expect(keepsDayOutOfBaseline(span({ kind: 'house_dip' }), dayStart, dayEnd)).toBe(false);
  });
});
