import { describe, expect, it } from 'vitest';
import {
  allowedTransitions,
  calendarDayOf,
  hoursToDone,
  isOverdue,
  planWorkOrderUpdate,
  type WorkOrderAsIs,
  safetyCautions,
  SAFETY_DEFERRAL,
} from './work-orders';

describe('allowedTransitions', () => {
  it('lets the assigned crew member start and finish, nothing more', () => {
    const crew = { role: 'crew' as const, isAssignee: true };
    expect(allowedTransitions('open', crew)).toEqual(['in_progress', 'done']);
    expect(allowedTransitions('in_progress', crew)).toEqual(['done']);
    expect(allowedTransitions('done', crew)).toEqual([]);
    expect(allowedTransitions('cancelled', crew)).toEqual([]);
  });

  it('gives a crew member nothing on an order assigned to someone else', () => {
    expect(allowedTransitions('open', { role: 'crew', isAssignee: false })).toEqual([]);
  });

  it('lets managers and admins cancel and reopen as well', () => {
    for (const role of ['manager', 'admin'] as const) {
      const who = { role, isAssignee: false };
      expect(allowedTransitions('open', who)).toEqual(['in_progress', 'done', 'cancelled']);
      expect(allowedTransitions('in_progress', who)).toEqual(['open', 'done', 'cancelled']);
      expect(allowedTransitions('done', who)).toEqual(['open']);
      expect(allowedTransitions('cancelled', who)).toEqual(['open']);
    }
  });

  it('gives an integrator nothing', () => {
    expect(allowedTransitions('open', { role: 'integrator', isAssignee: true })).toEqual([]);
  });
});

describe('isOverdue', () => {
  it('is overdue only while still to do and after the due day', () => {
    expect(isOverdue({ state: 'open', dueOn: '2026-12-01' }, '2026-12-02')).toBe(true);
    expect(isOverdue({ state: 'in_progress', dueOn: '2026-12-01' }, '2026-12-02')).toBe(true);
    expect(isOverdue({ state: 'open', dueOn: '2026-12-02' }, '2026-12-02')).toBe(false);
    expect(isOverdue({ state: 'done', dueOn: '2026-11-01' }, '2026-12-02')).toBe(false);
    expect(isOverdue({ state: 'cancelled', dueOn: '2026-11-01' }, '2026-12-02')).toBe(false);
    expect(isOverdue({ state: 'open', dueOn: null }, '2026-12-02')).toBe(false);
  });
});

describe('calendarDayOf', () => {
  it('reads the date on the house’s own wall clock', () => {
    // 03:30 UTC on 2 Dec is still 1 Dec in Chicago (UTC−6 in winter) and already 2 Dec in Amsterdam.
    const instant = new Date('2026-12-02T03:30:00Z');
    expect(calendarDayOf(instant, 'America/Chicago')).toBe('2026-12-01');
    expect(calendarDayOf(instant, 'Europe/Amsterdam')).toBe('2026-12-02');
  });
});

describe('hoursToDone', () => {
  const at = (h: number) => new Date(Date.UTC(2026, 11, 1, h));
  it('takes the median of the hours from exception to done (even count: mean of the middle two)', () => {
    const result = hoursToDone([
      { exceptionOpenedAt: at(0), doneAt: at(2) },
      { exceptionOpenedAt: at(0), doneAt: at(10) },
      { exceptionOpenedAt: at(1), doneAt: at(5) },
      { exceptionOpenedAt: at(0), doneAt: at(20) },
    ]);
    expect(result).toEqual({ count: 4, medianHours: 7, maxHours: 20 });
  });

  it('has no figure without pairs, and skips a done time before its exception', () => {
    expect(hoursToDone([])).toEqual({ count: 0, medianHours: null, maxHours: null });
    expect(hoursToDone([{ exceptionOpenedAt: at(5), doneAt: at(1) }]).count).toBe(0);
  });
});

describe('safetyCautions', () => {
  it('always names lock-out/tag-out with its agricultural rule, and the upper tier when there is one', () => {
    const cautions = safetyCautions({ tier: 3, tiers: 3 });
    expect(cautions[0]?.title).toBe('Lock out and tag out first');
    // 29 CFR 1928.57(a)(6): lock out power before servicing farmstead equipment (../shared/TRADE-FACTS.md §6).
    expect(cautions[0]?.text).toContain('29 CFR 1928.57');
    expect(cautions.map((c) => c.title)).toContain('Working at height: tier 3');
    expect(cautions.map((c) => c.title)).toEqual(
      expect.arrayContaining(['Ammonia and dust', 'House entry and biosecurity']),
    );
    expect(SAFETY_DEFERRAL).toContain("site's own safety procedures");
  });
});

describe('planWorkOrderUpdate', () => {
  const now = new Date('2026-11-10T09:30:00Z');
  const order = (over: Partial<WorkOrderAsIs> = {}): WorkOrderAsIs => ({
    state: 'open',
    assigneeId: 5,
    exceptionId: 12,
    findingCause: null,
    startedAt: null,
    ...over,
  });
  const crew = { role: 'crew' as const, isAssignee: true };
  const manager = { role: 'manager' as const, isAssignee: false };

  it('lets the assigned crew member start it, keeping the first start', () => {
    const plan = planWorkOrderUpdate(order(), { state: 'in_progress' }, crew, now);
    expect(plan).toMatchObject({ moveTo: 'in_progress', patch: { startedAt: now } });
    const earlier = new Date('2026-11-09T08:00:00Z');
    const again = planWorkOrderUpdate(
      order({ state: 'open', startedAt: earlier }),
      { state: 'in_progress' },
      crew,
      now,
    );
    expect(again).toMatchObject({ patch: { startedAt: earlier } });
  });

  it('refuses crew the order itself, and cancelling or reopening', () => {
    expect(planWorkOrderUpdate(order(), { title: 'Other' }, crew, now)).toMatchObject({
      refused: 'forbidden',
    });
    expect(
      planWorkOrderUpdate(order(), { state: 'cancelled', cancelReason: 'dup' }, crew, now),
    ).toMatchObject({ refused: 'forbidden' });
    expect(
      planWorkOrderUpdate(order({ state: 'done' }), { state: 'open' }, crew, now),
    ).toMatchObject({ refused: 'forbidden' });
  });

  it('needs a cause to be done and a reason to be cancelled, naming the field', () => {
    expect(planWorkOrderUpdate(order(), { state: 'done' }, crew, now)).toMatchObject({
      refused: 'invalid',
      field: { path: 'findingCause' },
    });
    const done = planWorkOrderUpdate(order(), { state: 'done', findingCause: 'feed' }, crew, now);
    expect(done).toMatchObject({
      moveTo: 'done',
      patch: { state: 'done', doneAt: now, startedAt: now, findingCause: 'feed' },
    });
    expect(planWorkOrderUpdate(order(), { state: 'cancelled' }, manager, now)).toMatchObject({
      refused: 'invalid',
      field: { path: 'cancelReason' },
    });
  });

  it('clears done and cancelled when a manager reopens it', () => {
    const plan = planWorkOrderUpdate(
      order({ state: 'cancelled' }),
      { state: 'open' },
      manager,
      now,
    );
    expect(plan).toMatchObject({
      moveTo: 'open',
      patch: { doneAt: null, cancelledAt: null, cancelReason: null },
    });
  });

  it('closes the exception only for an order from one, being marked done', () => {
    const closing = planWorkOrderUpdate(
      order(),
      { state: 'done', findingCause: 'water', closeException: true },
      crew,
      now,
    );
    expect(closing).toMatchObject({ closesException: true });
    expect(
      planWorkOrderUpdate(
        order({ exceptionId: null }),
        { state: 'done', findingCause: 'water', closeException: true },
        crew,
        now,
      ),
    ).toMatchObject({ refused: 'invalid', field: { path: 'closeException' } });
    expect(planWorkOrderUpdate(order(), { closeException: true }, manager, now)).toMatchObject({
      refused: 'invalid',
    });
  });
});
