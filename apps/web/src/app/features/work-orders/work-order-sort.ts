import type { Sort } from '@angular/material/sort';
import type { WorkOrderSummary } from '@tierscope/contracts';
import { PRIORITY_RANK } from './work-order-labels';

/** The table's order for a sort header; ties keep the oldest first. */
export function sortOrders(list: readonly WorkOrderSummary[], sort: Sort): WorkOrderSummary[] {
  const key = (o: WorkOrderSummary): string | number => {
    switch (sort.active) {
      case 'id':
        return o.id;
      case 'where':
        return `${o.houseName} ${String(o.row ?? 0).padStart(3, '0')} ${String(o.tier ?? 0).padStart(2, '0')}`;
      case 'title':
        return o.title.toLowerCase();
      case 'priority':
        return PRIORITY_RANK[o.priority];
      case 'state':
        return ['open', 'in_progress', 'done', 'cancelled'].indexOf(o.state);
      case 'assignee':
        return o.assignee?.name ?? '~';
      case 'due':
        return o.dueOn ?? '9999-12-31';
      case 'checklist':
        return o.checklistTotal === 0 ? 1 : o.checklistDone / o.checklistTotal;
      default:
        return o.createdAt;
    }
  };
  const direction = sort.direction === 'desc' ? -1 : 1;
  return [...list].sort((a, b) => {
    const ka = key(a);
    const kb = key(b);
    if (ka < kb) return -direction;
    if (ka > kb) return direction;
    return a.id - b.id;
  });
}
