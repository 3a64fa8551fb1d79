import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { type CloseException, type ExceptionView, type WorkOrder } from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import {
  CLOSE_REASON_WORDS,
  EXCEPTION_KIND_LABELS,
  EXCEPTION_STATUS_LABELS,
  type CloseReason,
} from '@tierscope/domain';
import { describeApiError } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { CloseDialog } from './close-dialog';
import { WorkOrderDialog, type WorkOrderDialogData } from '../work-orders/work-order-dialog';
import { ExceptionsStore } from './exceptions-store';
import { houseTime } from '../../shared/ui/local-dates';

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
  protected readonly store = inject(ExceptionsStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);

  /** `?houseId=` from a mailed link, bound by the router. */
  readonly houseId = input<string>();
  protected readonly columns = ['where', 'what', 'measured', 'opened', 'lost', 'status', 'actions'];

  constructor() {
    this.store.followHouseParam(() => {
      const id = Number(this.houseId());
      return Number.isInteger(id) && id > 0 ? id : null;
    });
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
      await this.store.acknowledge(e);
      this.snackBar.open('Acknowledged', undefined, { duration: 2500 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
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
      await this.store.close(e, input);
      this.snackBar.open('Closed', undefined, { duration: 2500 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
