import { computed, inject, Injectable, linkedSignal, signal } from '@angular/core';
import type { CloseException, ExceptionView } from '@tierscope/contracts';
import type { ExceptionKind } from '@tierscope/domain';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { WorkOrdersApi } from '../work-orders/work-orders-api';
import { ExceptionsApi } from './exceptions-api';

export type StatusFilter = 'live' | 'closed' | '';

/** The exceptions page's state: its filters, the list they select, the orders already opened, and the acts. */
@Injectable()
export class ExceptionsStore {
  private readonly api = inject(ExceptionsApi);
  private readonly auth = inject(AuthStore);
  private readonly workOrdersApi = inject(WorkOrdersApi);
  private readonly houseParam = signal<() => number | null>(() => null);

  readonly status = signal<StatusFilter>('live');
  readonly kind = signal<ExceptionKind | ''>('');
  /** The house filter: the one a mailed link names, until the user picks another. */
  readonly houseFilter = linkedSignal<number | null>(() => this.houseParam()());
  readonly exceptions = this.api.list(() => ({
    status: this.status() || undefined,
    kind: this.kind() || undefined,
    houseId: this.houseFilter() ?? undefined,
  }));
  /** Work orders already opened from exceptions (managers), so nobody opens a second one unawares. */
  private readonly workOrders = this.workOrdersApi.list(() =>
    this.auth.hasPermission('workOrders.manage') ? {} : undefined,
  );
  readonly ordersByException = computed(() => {
    const byException = new Map<number, number[]>();
    for (const o of this.workOrders.value() ?? []) {
      if (o.exceptionId !== null) {
        byException.set(o.exceptionId, [...(byException.get(o.exceptionId) ?? []), o.id]);
      }
    }
    return byException;
  });
  /** The houses the list shows, for the house picker. */
  readonly houses = computed(() => {
    const seen = new Map<number, string>();
    for (const e of this.exceptions.value() ?? []) seen.set(e.houseId, e.houseName);
    return [...seen];
  });
  readonly loadStatus = computed(() => listState(this.exceptions));
  readonly errorText = computed(() => describeApiError(this.exceptions.error()));

  /** Filters by the house a route parameter names (`?houseId=` of a mailed link). */
  followHouseParam(houseId: () => number | null): void {
    this.houseParam.set(houseId);
  }

  canAct(e: ExceptionView): boolean {
    return this.auth.hasPermission('exceptions.acknowledge', e.farmId) && e.status !== 'closed';
  }

  /** A work order is offered once per exception: when one exists, its link is shown instead. */
  canOpenWorkOrder(e: ExceptionView): boolean {
    return (
      this.auth.hasPermission('workOrders.manage', e.farmId) &&
      e.status !== 'closed' &&
      !this.ordersByException().has(e.id)
    );
  }

  /** Acknowledges; the list is read again whether or not it succeeded (someone else may have acted). */
  async acknowledge(e: ExceptionView): Promise<void> {
    try {
      await this.api.acknowledge(e.id);
    } finally {
      this.exceptions.reload();
    }
  }

  async close(e: ExceptionView, input: CloseException): Promise<void> {
    try {
      await this.api.close(e.id, input);
    } finally {
      this.exceptions.reload();
    }
  }
}
