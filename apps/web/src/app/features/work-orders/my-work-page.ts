import { ChangeDetectionStrategy, Component, computed, signal, inject } from '@angular/core';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { endpoints } from '@tierscope/contracts';
import { WORK_ORDER_STATE_LABELS } from '@tierscope/domain';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { PRIORITY_LABELS, spotOf } from './work-order-labels';
import { ApiClient } from '../../core/http/api-client';

/** The crew's own work, phone first: what is assigned to me, oldest first, one big card each. */
@Component({
  selector: 'ts-my-work-page',
  imports: [RouterLink, MatIconModule, MatButtonToggleModule, LoadState],
  templateUrl: './my-work-page.html',
  styleUrl: './my-work-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MyWorkPage {
  private readonly api = inject(ApiClient);
  protected readonly show = signal<'active' | 'done'>('active');
  protected readonly orders = this.api.resource(endpoints.workOrders.list, () => ({
    query: { mine: true, state: this.show() },
  }));
  protected readonly shown = computed(() => {
    const list = this.orders.value() ?? [];
    // Finished work: newest first; work to do: oldest first, as the server sends it.
    return this.show() === 'done' ? [...list].reverse() : list;
  });
  protected readonly state = computed(() => listState(this.orders));
  protected readonly errorText = computed(() => describeApiError(this.orders.error()));
  protected readonly spotOf = spotOf;
  protected readonly stateLabels = WORK_ORDER_STATE_LABELS;
  protected readonly priorityLabels = PRIORITY_LABELS;
}
