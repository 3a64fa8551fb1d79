import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { type WorkOrder, type WorkOrderSummary } from '@tierscope/contracts';
import { WORK_ORDER_STATE_LABELS } from '@tierscope/domain';
import { firstValueFrom } from 'rxjs';
import { describeApiError } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { WorkOrderDialog, type WorkOrderDialogData } from './work-order-dialog';
import { PRIORITY_LABELS, spotOf } from './work-order-labels';
import { WorkOrdersStore } from './work-orders-store';

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
  protected readonly store = inject(WorkOrdersStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);
  private readonly router = inject(Router);

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
      await this.store.downloadCsv();
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected open(o: WorkOrderSummary): void {
    void this.router.navigate(['/work-orders', o.id]);
  }
}
