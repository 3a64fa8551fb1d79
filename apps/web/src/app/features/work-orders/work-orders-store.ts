import { computed, inject, Injectable, signal } from '@angular/core';
import type { Sort } from '@angular/material/sort';
import type { WorkOrdersQuery } from '@tierscope/contracts';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { sortOrders } from './work-order-sort';
import { WorkOrdersApi } from './work-orders-api';

export type StateFilter = 'active' | 'open' | 'in_progress' | 'done' | 'cancelled' | '';

/** The managers' work-order list: its filters and sort, the orders they select, and the pickers' choices. */
@Injectable()
export class WorkOrdersStore {
  private readonly api = inject(WorkOrdersApi);

  readonly state = signal<StateFilter>('active');
  readonly houseId = signal<number | null>(null);
  readonly assigneeId = signal<number | null>(null);
  readonly isOverdueOnly = signal(false);
  readonly sort = signal<Sort>({ active: 'created', direction: 'asc' });

  private readonly query = computed((): Partial<WorkOrdersQuery> => ({
    state: this.state() || undefined,
    houseId: this.houseId() ?? undefined,
    assigneeId: this.assigneeId() ?? undefined,
    overdue: this.isOverdueOnly() || undefined,
  }));
  readonly orders = this.api.list(this.query);
  /** Every order, unfiltered, only to fill the house and assignee pickers. */
  private readonly everything = this.api.list(() => ({}));
  readonly houses = computed(() => {
    const seen = new Map<number, string>();
    for (const o of this.everything.value() ?? [])
      seen.set(o.houseId, `${o.houseName} (${o.farmName})`);
    return [...seen].sort((a, b) => a[1].localeCompare(b[1]));
  });
  readonly people = computed(() => {
    const seen = new Map<number, string>();
    for (const o of this.everything.value() ?? [])
      if (o.assignee) seen.set(o.assignee.id, o.assignee.name);
    return [...seen].sort((a, b) => a[1].localeCompare(b[1]));
  });
  readonly sorted = computed(() => sortOrders(this.orders.value() ?? [], this.sort()));
  readonly loadStatus = computed(() => listState(this.orders));
  readonly errorText = computed(() => describeApiError(this.orders.error()));

  /** The list as CSV, with the filters shown. */
  downloadCsv(): Promise<void> {
    return this.api.downloadCsv(this.query());
  }
}
