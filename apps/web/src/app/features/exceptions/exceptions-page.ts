import { DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  input,
  linkedSignal,
  signal,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import {
  type CloseException,
  type ExceptionView,
  type WorkOrder,
  endpoints,
} from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import {
  CLOSE_REASON_WORDS,
  EXCEPTION_KIND_LABELS,
  EXCEPTION_STATUS_LABELS,
  type CloseReason,
  type ExceptionKind,
} from '@tierscope/domain';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { CloseDialog } from './close-dialog';
import { WorkOrderDialog, type WorkOrderDialogData } from '../work-orders/work-order-dialog';
import { ApiClient } from '../../core/http/api-client';
import { houseTime } from '../../shared/ui/local-dates';

type StatusFilter = 'live' | 'closed' | '';

/** Open and recent exceptions across the user's farms: filter, acknowledge, close. */
@Component({
  selector: 'ts-exceptions-page',
  imports: [
    DecimalPipe,
    RouterLink,
    MatTableModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatSelectModule,
    LoadState,
  ],
  templateUrl: './exceptions-page.html',
  styleUrl: './exceptions-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ExceptionsPage {
  private readonly auth = inject(AuthStore);
  private readonly api = inject(ApiClient);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);

  protected readonly status = signal<StatusFilter>('live');
  protected readonly kind = signal<ExceptionKind | ''>('');
  /** `?houseId=` from a mailed link, bound by the router. */
  readonly houseId = input<string>();
  protected readonly houseFilter = linkedSignal<number | null>(() => {
    const id = Number(this.houseId());
    return Number.isInteger(id) && id > 0 ? id : null;
  });
  protected readonly exceptions = this.api.resource(endpoints.exceptions.list, () => ({
    query: {
      status: this.status() || undefined,
      kind: this.kind() || undefined,
      houseId: this.houseFilter() ?? undefined,
    },
  }));
  /** Work orders already opened from exceptions (managers), so nobody opens a second one unawares. */
  private readonly workOrders = this.api.resource(endpoints.workOrders.list, () =>
    this.auth.hasPermission('workOrders.manage') ? {} : undefined,
  );
  protected readonly ordersByException = computed(() => {
    const byException = new Map<number, number[]>();
    for (const o of this.workOrders.value() ?? []) {
      if (o.exceptionId !== null) {
        byException.set(o.exceptionId, [...(byException.get(o.exceptionId) ?? []), o.id]);
      }
    }
    return byException;
  });
  protected readonly houses = computed(() => {
    const seen = new Map<number, string>();
    for (const e of this.exceptions.value() ?? []) seen.set(e.houseId, e.houseName);
    return [...seen];
  });
  protected readonly state = computed(() => listState(this.exceptions));
  protected readonly errorText = computed(() => describeApiError(this.exceptions.error()));
  protected readonly columns = ['where', 'what', 'measured', 'opened', 'lost', 'status', 'actions'];

  protected canAct(e: ExceptionView): boolean {
    return this.auth.hasPermission('exceptions.acknowledge', e.farmId) && e.status !== 'closed';
  }

  /** A work order is offered once per exception: when one exists, its link is shown instead. */
  protected canOpenWorkOrder(e: ExceptionView): boolean {
    return (
      this.auth.hasPermission('workOrders.manage', e.farmId) &&
      e.status !== 'closed' &&
      !this.ordersByException().has(e.id)
    );
  }

  protected async openWorkOrder(e: ExceptionView): Promise<void> {
    const created = await firstValueFrom(
      this.dialog
        .open<WorkOrderDialog, WorkOrderDialogData, WorkOrder>(WorkOrderDialog, {
          data: { exception: e, where: this.where(e).toLowerCase() },
        })
        .afterClosed(),
    );
    if (!created) return;
    this.snackBar.open(`Work order #${created.id} opened`, undefined, { duration: 2500 });
    await this.router.navigate(['/work-orders', created.id]);
  }

  protected where(e: ExceptionView): string {
    if (e.scope === 'section') return `Row ${e.row}, tier ${e.tier}`;
    if (e.scope === 'row') return `Row ${e.row} (all tiers)`;
    if (e.scope === 'tier') return `Tier ${e.tier} (all rows)`;
    return 'Whole house';
  }

  /** When it opened, on the house's own clock with its zone. */
  protected opened(e: ExceptionView): string {
    return houseTime(e.openedAt, e.timezone);
  }

  /** The status in words: who acknowledged it, why it closed. */
  protected statusWords(e: ExceptionView): string {
    const status = EXCEPTION_STATUS_LABELS[e.status];
    if (e.status === 'acknowledged' && e.acknowledgedBy) return `${status} by ${e.acknowledgedBy}`;
    const reason = e.closeReason as CloseReason | null;
    return reason && reason in CLOSE_REASON_WORDS
      ? `${status}: ${CLOSE_REASON_WORDS[reason]}`
      : status;
  }

  protected what(e: ExceptionView): string {
    return EXCEPTION_KIND_LABELS[e.kind];
  }

  protected async acknowledge(e: ExceptionView): Promise<void> {
    try {
      await this.api.call(endpoints.exceptions.acknowledge, { params: { exceptionId: e.id } });
      this.snackBar.open('Acknowledged', undefined, { duration: 2500 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
    this.exceptions.reload();
  }

  protected async close(e: ExceptionView): Promise<void> {
    const input = await firstValueFrom(
      this.dialog
        .open<CloseDialog, { title: string }, CloseException>(CloseDialog, {
          data: { title: `${e.houseName}, ${this.where(e)}` },
        })
        .afterClosed(),
    );
    if (!input) return;
    try {
      await this.api.call(endpoints.exceptions.close, {
        params: { exceptionId: e.id },
        body: input,
      });
      this.snackBar.open('Closed', undefined, { duration: 2500 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
    this.exceptions.reload();
  }
}
