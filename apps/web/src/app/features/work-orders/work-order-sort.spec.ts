import type { WorkOrderSummary } from '@tierscope/contracts';
import { workOrderSummary } from '../../../testing/fixtures';
import { sortOrders } from './work-order-sort';

const base = workOrderSummary(1);

describe('sortOrders', () => {
  const list: WorkOrderSummary[] = [
    { ...base, id: 1, priority: 'low', dueOn: '2026-12-10', createdAt: '2026-12-01T00:00:00.000Z' },
    { ...base, id: 2, priority: 'urgent', dueOn: null, createdAt: '2026-12-03T00:00:00.000Z' },
    {
      ...base,
      id: 3,
      priority: 'high',
      dueOn: '2026-12-05',
      createdAt: '2026-12-02T00:00:00.000Z',
    },
  ];

  it('puts urgent first when sorting by priority', () => {
    expect(sortOrders(list, { active: 'priority', direction: 'asc' }).map((o) => o.id)).toEqual([
      2, 3, 1,
    ]);
  });

  it('puts orders without a due date last, and reverses for descending', () => {
    expect(sortOrders(list, { active: 'due', direction: 'asc' }).map((o) => o.id)).toEqual([
      3, 1, 2,
    ]);
    expect(sortOrders(list, { active: 'created', direction: 'desc' }).map((o) => o.id)).toEqual([
      2, 3, 1,
    ]);
  });

  it('does not change the list it was given', () => {
    sortOrders(list, { active: 'priority', direction: 'asc' });
    expect(list.map((o) => o.id)).toEqual([1, 2, 3]);
  });
});
