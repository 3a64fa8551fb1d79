import type { ExceptionView } from '@tierscope/contracts';
import { withLiveException } from './house-live-page';

const exception = (id: number, over: Partial<ExceptionView> = {}): ExceptionView => ({
  id,
  farmId: 1,
  houseId: 2,
  houseName: 'House 2',
  timezone: 'America/Chicago',
  kind: 'shortfall',
  scope: 'row',
  row: 4,
  tier: null,
  status: 'open',
  isLearning: false,
  openedAt: '2026-11-10T12:00:00.000Z',
  closedAt: null,
  eggs: 820,
  expected: 1000,
  ratio: 0.82,
  pValue: 1e-9,
  worstRatio: 0.82,
  atOpen: { eggs: 820, expected: 1000, ratio: 0.82 },
  eggsLost: 180,
  eggsLostValue: null,
  likelyChecks: [],
  acknowledgedAt: null,
  acknowledgedBy: null,
  closeReason: null,
  closeNote: null,
  ...over,
});

describe('withLiveException (the house page follows exception messages without reading the list again)', () => {
  it('adds a new exception first', () => {
    const list = withLiveException([exception(1)], exception(2));
    expect(list.map((e) => e.id)).toEqual([2, 1]);
  });

  it('replaces one that changed where it stands', () => {
    const list = withLiveException(
      [exception(3), exception(1)],
      exception(1, { status: 'acknowledged', acknowledgedBy: 'Sam' }),
    );
    expect(list.map((e) => [e.id, e.status])).toEqual([
      [3, 'open'],
      [1, 'acknowledged'],
    ]);
  });

  it('drops one that closed', () => {
    const list = withLiveException(
      [exception(3), exception(1)],
      exception(3, { status: 'closed', closeReason: 'recovered' }),
    );
    expect(list.map((e) => e.id)).toEqual([1]);
  });
});
