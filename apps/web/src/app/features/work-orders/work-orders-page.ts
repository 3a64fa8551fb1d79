import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import {
  type WorkOrder,
  type WorkOrderSummary,
  endpoints,
  type WorkOrdersQuery,
} from '@tierscope/contracts';
import { WORK_ORDER_STATE_LABELS } from '@tierscope/domain';
import { firstValueFrom } from 'rxjs';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { WorkOrderDialog, type WorkOrderDialogData } from './work-order-dialog';
import { PRIORITY_LABELS, PRIORITY_RANK, spotOf } from './work-order-labels';
import { WorkOrdersApi } from './work-orders-api';
import { ApiClient } from '../../core/http/api-client';

type StateFilter = 'active' | 'open' | 'in_progress' | 'done' | 'cancelled' | '';

/** Managers' view of every work order of their farms: filter, sort, export, open new ones. */
@Component({
  selector: 'ts-work-orders-page',
  imports: [
    DatePipe,
    RouterLink,
    MatTableModule,
    MatSortModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatSelectModule,
    MatSlideToggleModule,
    LoadState,
  ],
  templateUrl: './work-orders-page.html',
  styleUrl: './work-orders-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorkOrdersPage {
  private readonly api = inject(WorkOrdersApi);
  private readonly client = inject(ApiClient);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);

  protected readonly state = signal<StateFilter>('active');
  protected readonly houseId = signal<number | null>(null);
  protected readonly assigneeId = signal<number | null>(null);
  protected readonly isOverdueOnly = signal(false);
  protected readonly sort = signal<Sort>({ active: 'created', direction: 'asc' });

  private readonly query = computed((): Partial<WorkOrdersQuery> => ({
    state: this.state() || undefined,
    houseId: this.houseId() ?? undefined,
    assigneeId: this.assigneeId() ?? undefined,
    overdue: this.isOverdueOnly() || undefined,
  }));
  protected readonly orders = this.client.resource(endpoints.workOrders.list, () => ({
    query: this.query(),
  }));
  /** Every order, unfiltered, only to fill the house and assignee pickers. */
  private readonly everything = this.client.resource(endpoints.workOrders.list, () => ({}));
  protected readonly houses = computed(() => {
    const seen = new Map<number, string>();
    for (const o of this.everything.value() ?? [])
      seen.set(o.houseId, `${o.houseName} (${o.farmName})`);
    return [...seen].sort((a, b) => a[1].localeCompare(b[1]));
  });
  protected readonly people = computed(() => {
    const seen = new Map<number, string>();
    for (const o of this.everything.value() ?? [])
      if (o.assignee) seen.set(o.assignee.id, o.assignee.name);
    return [...seen].sort((a, b) => a[1].localeCompare(b[1]));
  });
  protected readonly sorted = computed(() => sortOrders(this.orders.value() ?? [], this.sort()));
  protected readonly loadState = computed(() => listState(this.orders));
  protected readonly errorText = computed(() => describeApiError(this.orders.error()));
  protected readonly columns = [
    'id',
    'where',
    'title',
    'priority',
    'state',
    'assignee',
    'due',
    'checklist',
    'created',
  ];
  protected readonly spotOf = spotOf;

  protected stateLabel(o: WorkOrderSummary): string {
    return WORK_ORDER_STATE_LABELS[o.state];
  }

  protected priorityLabel(o: WorkOrderSummary): string {
    return PRIORITY_LABELS[o.priority];
  }

  protected async newOrder(): Promise<void> {
    const created = await firstValueFrom(
      this.dialog
        .open<WorkOrderDialog, WorkOrderDialogData, WorkOrder>(WorkOrderDialog, { data: {} })
        .afterClosed(),
    );
    if (!created) return;
    this.snackBar.open(`Work order #${created.id} opened`, undefined, { duration: 2500 });
    await this.router.navigate(['/work-orders', created.id]);
  }

  protected async exportCsv(): Promise<void> {
    try {
      await this.api.downloadCsv(this.query());
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected open(o: WorkOrderSummary): void {
    void this.router.navigate(['/work-orders', o.id]);
  }
}

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
