import {
  ChangeDetectionStrategy,
  Component,
  effect,
  inject,
  untracked,
  linkedSignal,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { workOrderCreateSchema, type ExceptionView, type WorkOrder } from '@tierscope/contracts';
import { WORK_ORDER_PRIORITIES, type WorkOrderPriority } from '@tierscope/domain';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { PRIORITY_LABELS } from './work-order-labels';
import { HousesApi } from '../../core/http/houses-api';
import { WorkOrdersApi } from './work-orders-api';

export interface WorkOrderDialogData {
  /** open it from this exception: its house and spot are taken, its likely checks become the checklist */
  exception?: ExceptionView;
  /** the spot's words, shown as the location when opened from an exception */
  where?: string;
}

/** Opens a work order, from an exception or by hand, and hands it to someone of that farm. */
@Component({
  selector: 'ts-work-order-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
  ],
  templateUrl: './work-order-dialog.html',
  styles: `
    .form {
      display: grid;
      grid-template-columns: 1fr 1fr;
      gap: 4px 12px;
      min-width: min(520px, 82vw);
    }
    .wide {
      grid-column: 1 / -1;
    }
    .from {
      grid-column: 1 / -1;
      margin: 0 0 12px;
      padding: 8px 12px;
      border-radius: 8px;
      background: var(--ts-straw-soft);
    }
    @media (max-width: 599px) {
      .form {
        grid-template-columns: 1fr;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorkOrderDialog {
  protected readonly data = inject<WorkOrderDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<WorkOrderDialog, WorkOrder>);
  private readonly api = inject(WorkOrdersApi);
  private readonly auth = inject(AuthStore);

  protected readonly priorities = WORK_ORDER_PRIORITIES.map((p) => [p, PRIORITY_LABELS[p]]);
  protected readonly farms = this.auth.farmsWith('workOrders.manage');
  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly form = this.fb.group({
    farmId: [this.data.exception?.farmId ?? this.farms()[0]?.farmId ?? 0],
    houseId: [this.data.exception?.houseId ?? 0],
    row: [''],
    tier: [''],
    title: [
      this.data.exception ? this.defaultTitle(this.data.exception) : '',
      zodValidator(workOrderCreateSchema.shape.title),
    ],
    priority: this.fb.control<WorkOrderPriority>('normal'),
    assigneeId: [null as number | null],
    dueOn: [''],
    checklist: [''],
  });
  private readonly farmId = toSignal(this.form.controls.farmId.valueChanges, {
    initialValue: this.form.controls.farmId.value,
  });
  protected readonly houses = inject(HousesApi).housesOfFarm(() =>
    this.data.exception ? null : this.farmId(),
  );
  protected readonly assignees = this.api.assignees(this.farmId);
  private readonly houseId = toSignal(this.form.controls.houseId.valueChanges, {
    initialValue: this.form.controls.houseId.value,
  });
  protected readonly house = linkedSignal(
    () => this.houses.value()?.find((h) => h.id === this.houseId()) ?? null,
  );
  protected readonly isSaving = signal(false);
  protected readonly errorText = signal<string | null>(null);
  protected readonly firstError = firstError;

  constructor() {
    // A change of farm clears what belonged to the other farm.
    this.form.controls.farmId.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => {
      this.form.controls.houseId.setValue(0);
      this.form.controls.assigneeId.setValue(null);
    });
    // By hand: the farm's first house is chosen once the list arrives.
    effect(() => {
      const first = this.houses.value()?.[0];
      if (first && untracked(() => this.form.controls.houseId.value) === 0) {
        this.form.controls.houseId.setValue(first.id);
      }
    });
  }

  private defaultTitle(e: ExceptionView): string {
    const what = {
      shortfall: 'Low lay',
      silent_counter: 'Silent counter',
      collector_gap: 'Collector gap',
      house_dip: 'House dip',
    }[e.kind];
    return `${what}: ${e.houseName}, ${this.data.where ?? ''}`.replace(/, $/, '');
  }

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const toNumber = (text: string) => (text.trim() === '' ? null : Number(text));
    const checklist = v.checklist
      .split('\n')
      .map((line) => line.trim())
      .filter((line) => line !== '');
    this.isSaving.set(true);
    this.errorText.set(null);
    try {
      const created = await this.api.create({
        houseId: v.houseId,
        title: v.title,
        priority: v.priority,
        assigneeId: v.assigneeId,
        dueOn: v.dueOn === '' ? null : v.dueOn,
        ...(this.data.exception
          ? { exceptionId: this.data.exception.id }
          : {
              row: toNumber(v.row),
              tier: toNumber(v.tier),
              ...(checklist.length > 0 ? { checklist } : {}),
            }),
      });
      this.ref.close(created);
    } catch (error) {
      const fields = fieldErrorsOf(error);
      for (const [path, message] of Object.entries(fields)) {
        const control = this.form.get(path);
        if (control) {
          control.setErrors({ server: message });
          control.markAsTouched();
        }
      }
      this.errorText.set(describeApiError(error));
    } finally {
      this.isSaving.set(false);
    }
  }
}
