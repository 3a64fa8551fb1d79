import { DatePipe, DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
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
import { type WorkOrderUpdate } from '@tierscope/contracts';
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
import { describeApiError } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { PRIORITY_LABELS, spotOf } from './work-order-labels';
import { WorkOrderStore } from './work-order-store';

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

  protected readonly store = inject(WorkOrderStore);
  private readonly snackBar = inject(MatSnackBar);

  /** The order as last read or as the last change answered it. */
  protected readonly order = this.store.order;
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
  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly findings = this.fb.group({
    cause: this.fb.control<FindingCause | ''>(''),
    notes: [''],
    closeException: [true],
  });
  protected readonly cancelForm = inject(NonNullableFormBuilder).group({ reason: [''] });
  protected readonly isCancelling = signal(false);

  constructor() {
    this.store.followOrder(() => {
      const id = Number(this.workOrderId());
      return Number.isInteger(id) && id > 0 ? id : null;
    });
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
      if (o) this.store.fetchPhotos(o);
    });
  }

  /** Makes one change through the store and says how it went. */
  private async change(work: () => Promise<void>, done: string): Promise<boolean> {
    try {
      await work();
      this.snackBar.open(done, undefined, { duration: 2500 });
      return true;
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
      return false;
    }
  }

  protected async toggle(itemId: number, isChecked: boolean): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(
      () => this.store.setChecklistItem(itemId, isChecked),
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
      if (this.store.canCloseException() && f.closeException) input.closeException = true;
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
    if (await this.change(() => this.store.update(input), words[state])) {
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
        this.store.update({
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
    await this.change(() => this.store.update({ assigneeId }), 'Assignment changed');
  }

  protected async setPriority(priority: WorkOrderPriority): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(() => this.store.update({ priority }), 'Priority changed');
  }

  protected async setDue(dueOn: string): Promise<void> {
    const o = this.order();
    if (!o) return;
    await this.change(
      () => this.store.update({ dueOn: dueOn === '' ? null : dueOn }),
      'Due date changed',
    );
  }

  protected async upload(event: Event): Promise<void> {
    const o = this.order();
    const picker = event.target as HTMLInputElement;
    const files = [...(picker.files ?? [])];
    if (!o || files.length === 0) return;
    try {
      await this.store.addPhotos(files);
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
      picker.value = '';
    }
  }
}
