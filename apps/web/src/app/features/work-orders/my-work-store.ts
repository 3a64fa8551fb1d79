import { computed, inject, Injectable, signal } from '@angular/core';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { WorkOrdersApi } from './work-orders-api';

/** The crew's own work orders: to do, or done. */
@Injectable()
export class MyWorkStore {
  private readonly api = inject(WorkOrdersApi);

  readonly show = signal<'active' | 'done'>('active');
  readonly orders = this.api.list(() => ({ mine: true, state: this.show() }));
  readonly shown = computed(() => {
    const list = this.orders.value() ?? [];
    // Finished work: newest first; work to do: oldest first, as the server sends it.
    return this.show() === 'done' ? [...list].reverse() : list;
  });
  readonly loadStatus = computed(() => listState(this.orders));
  readonly errorText = computed(() => describeApiError(this.orders.error()));
}
