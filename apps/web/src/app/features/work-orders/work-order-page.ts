import { DatePipe, DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  DestroyRef,
  effect,
  inject,
  input,
  linkedSignal,
  signal,
} from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import { type WorkOrder, type WorkOrderUpdate, endpoints } from '@tierscope/contracts';
import {
  FINDING_CAUSE_LABELS,
  FINDING_CAUSES,
  SAFETY_DEFERRAL,
  safetyCautions,
  WORK_ORDER_PRIORITIES,
  WORK_ORDER_STATE_LABELS,
  type FindingCause,
  type WorkOrderPriority,
  type WorkOrderState,
} from '@tierscope/domain';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { LoadState, type LoadStatus } from '../../shared/ui/load-state';
import { PRIORITY_LABELS, spotOf } from './work-order-labels';
import { WorkOrdersApi } from './work-orders-api';
import { ApiClient } from '../../core/http/api-client';

/** One work order: where, why, the safety cautions, the checklist, findings, photos and its state. */
@Component({
  selector: 'ts-work-order-page',
  imports: [
    DatePipe,
    DecimalPipe,
    RouterLink,
    ReactiveFormsModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    LoadState,
  ],
  templateUrl: './work-order-page.html',
  styleUrl: './work-order-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorkOrderPage {
  /** from the route */
  readonly workOrderId = input.required<string>();

  private readonly api = inject(WorkOrdersApi);
  private readonly client = inject(ApiClient);
  private readonly auth = inject(AuthStore);
  private readonly snackBar = inject(MatSnackBar);

  private readonly resource = this.client.resource(endpoints.workOrders.get, () => ({
    params: { workOrderId: Number(this.workOrderId()) },
  }));
  /** The order as last read or as the last change answered it. */
  protected readonly order = linkedSignal<WorkOrder | undefined>(() =>
    this.resource.hasValue() ? this.resource.value() : undefined,
  );
  protected readonly loadState = computed((): LoadStatus => {
    if (this.order()) return 'ready';
    if (this.resource.error()) return 'error';
    return 'loading';
  });
  protected readonly errorText = computed(() => describeApiError(this.resource.error()));
  protected readonly assignees = this.client.resource(endpoints.workOrders.assignees, () => {
    const o = this.order();
    return o?.canEdit ? { params: { farmId: o.farmId } } : undefined;
  });
  protected readonly cautions = computed(() => {
    const o = this.order();
    return o ? safetyCautions({ tier: o.tier, tiers: o.tiers }) : [];
  });
  protected readonly deferral = SAFETY_DEFERRAL;
  protected readonly causes = FINDING_CAUSES.map((c) => [c, FINDING_CAUSE_LABELS[c]] as const);
  protected readonly causeLabels = FINDING_CAUSE_LABELS;
  protected readonly priorities = WORK_ORDER_PRIORITIES.map(
    (p) => [p, PRIORITY_LABELS[p]] as const,
  );
  protected readonly stateLabels = WORK_ORDER_STATE_LABELS;
  protected readonly priorityLabels = PRIORITY_LABELS;
  protected readonly spotOf = spotOf;
  protected readonly isBusy = signal(false);
  protected readonly isUploading = signal(false);
  protected readonly photoUrls = signal<Record<number, string>>({});
  /** Managers go back to every work order; the crew to their own. */
  protected readonly canSeeAll = computed(() => this.auth.hasPermission('workOrders.manage'));
  protected readonly canCloseException = computed(() => {
    const o = this.order();
    return (
      !!o &&
      o.exceptionId !== null &&
      o.exceptionStatus !== null &&
      o.exceptionStatus !== 'closed' &&
      this.auth.hasPermission('exceptions.acknowledge', o.farmId)
    );
  });

  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly findings = this.fb.group({
    cause: this.fb.control<FindingCause | ''>(''),
    notes: [''],
    closeException: [true],
  });
  protected readonly cancelForm = inject(NonNullableFormBuilder).group({ reason: [''] });
  protected readonly isCancelling = signal(false);

  constructor() {
    // Findings shown are the order's own whenever a fresh copy arrives, unless the user is typing some:
    // a tick or a photo must never wipe findings not saved yet.
    effect(() => {
      const o = this.order();
      if (!o || this.findings.dirty) return;
      this.findings.patchValue({ cause: o.findingCause ?? '', notes: o.findingNotes });
    });
    // Photos need the bearer token, so each is fetched once and shown from an object URL.
    effect(() => {
      const o = this.order();
      if (!o) return;
      for (const photo of o.photos) {
        if (this.photoUrls()[photo.id]) continue;
        this.api.photoUrl(o.id, photo.id).then(
          (url) => {
            this.photoUrls.update((all) => ({ ...all, [photo.id]: url }));
          },
          () => undefined, // a missing photo stays a placeholder; the rest of the page works
        );
      }
    });
    inject(DestroyRef).onDestroy(() => {
      for (const url of Object.values(this.photoUrls())) URL.revokeObjectURL(url);
    });
  }

  protected reload(): void {
    this.resource.reload();
  }

  private async change(work: () => Promise<WorkOrder>, done: string): Promise<boolean> {
    this.isBusy.set(true);
    try {
      this.order.set(await work());
      this.snackBar.open(done, undefined, { duration: 2500 });
      return true;
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
      return false;
    } finally {
      this.isBusy.set(false);
    }
  }

  protected async toggle(itemId: number, isChecked: boolean): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(
      () => this.api.setChecklistItem(o.id, itemId, isChecked),
      isChecked ? 'Ticked' : 'Unticked',
    );
  }

  protected async moveTo(state: WorkOrderState): Promise<void> {
    const o = this.order();
    if (!o) return;
    const f = this.findings.getRawValue();
    const input: WorkOrderUpdate = { state };
    if (state === 'done') {
      if (f.cause === '') {
        this.findings.controls.cause.setErrors({ required: true });
        this.findings.controls.cause.markAsTouched();
        this.snackBar.open('Choose what you found before marking it done', 'OK');
        return;
      }
      input.findingCause = f.cause;
      input.findingNotes = f.notes;
      if (this.canCloseException() && f.closeException) input.closeException = true;
    }
    if (state === 'cancelled') {
      const reason = this.cancelForm.getRawValue().reason.trim();
      if (reason.length < 3) {
        this.cancelForm.controls.reason.setErrors({ required: true });
        this.cancelForm.controls.reason.markAsTouched();
        return;
      }
      input.cancelReason = reason;
    }
    const words: Record<WorkOrderState, string> = {
      open: 'Reopened',
      in_progress: 'Started',
      done: 'Marked done. Thank you.',
      cancelled: 'Cancelled',
    };
    if (await this.change(() => this.api.update(o.id, input), words[state])) {
      this.isCancelling.set(false);
      this.findings.markAsPristine();
    }
  }

  protected async saveFindings(): Promise<void> {
    const o = this.order();
    if (!o) return;
    const f = this.findings.getRawValue();
    const isSaved = await this.change(
      () =>
        this.api.update(o.id, {
          findingCause: f.cause === '' ? null : f.cause,
          findingNotes: f.notes,
        }),
      'Findings saved',
    );
    if (isSaved) this.findings.markAsPristine();
  }

  protected async reassign(assigneeId: number | null): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(() => this.api.update(o.id, { assigneeId }), 'Assignment changed');
  }

  protected async setPriority(priority: WorkOrderPriority): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(() => this.api.update(o.id, { priority }), 'Priority changed');
  }

  protected async setDue(dueOn: string): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(
      () => this.api.update(o.id, { dueOn: dueOn === '' ? null : dueOn }),
      'Due date changed',
    );
  }

  protected async upload(event: Event): Promise<void> {
    const o = this.order();
    const picker = event.target as HTMLInputElement;
    const files = [...(picker.files ?? [])];
    if (!o || files.length === 0) return;
    this.isUploading.set(true);
    try {
      this.order.set(await this.api.addPhotos(o.id, files));
      this.snackBar.open(
        files.length === 1 ? 'Photo added' : `${files.length} photos added`,
        undefined,
        {
          duration: 2500,
        },
      );
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    } finally {
      this.isUploading.set(false);
      picker.value = '';
    }
  }
}
