import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { CloseException } from '@tierscope/contracts';

export const CLOSE_REASON_LABELS: Record<CloseException['reason'], string> = {
  fixed: 'Fixed: the cause was found and put right',
  normal_for_spot: 'Normal for this spot: learn it as the usual',
  false_alarm: 'False alarm: nothing was wrong',
  other: 'Other (say why)',
};

@Component({
  selector: 'ts-close-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatSelectModule,
    MatInputModule,
    MatButtonModule,
  ],
  template: `
    <h2 mat-dialog-title>Close: {{ data.title }}</h2>
    <mat-dialog-content>
      <form [formGroup]="form" id="close-form" (ngSubmit)="submit()" class="form">
        <mat-form-field appearance="outline">
          <mat-label>Why is it closed?</mat-label>
          <mat-select formControlName="reason" required>
            @for (reason of reasons; track reason[0]) {
              <mat-option [value]="reason[0]">{{ reason[1] }}</mat-option>
            }
          </mat-select>
          <mat-error>Choose a reason</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Note</mat-label>
          <textarea matInput formControlName="note" rows="3" maxlength="1000"></textarea>
          @if (form.controls.reason.value === 'other') {
            <mat-hint>Say what happened</mat-hint>
          }
          <mat-error>Say what happened</mat-error>
        </mat-form-field>
      </form>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" mat-dialog-close>Cancel</button>
      <button mat-flat-button type="submit" form="close-form">Close exception</button>
    </mat-dialog-actions>
  `,
  styles: `
    .form {
      display: flex;
      flex-direction: column;
      gap: 4px;
      min-width: min(420px, 80vw);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CloseDialog {
  protected readonly data = inject<{ title: string }>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<CloseDialog, CloseException>);
  protected readonly reasons = Object.entries(CLOSE_REASON_LABELS);
  protected readonly form = inject(NonNullableFormBuilder).group({
    reason: ['' as CloseException['reason'] | '', Validators.required],
    note: [''],
  });

  protected submit(): void {
    const { reason, note } = this.form.getRawValue();
    if (reason === 'other' && note.trim() === '')
      this.form.controls.note.setErrors({ required: true });
    if (this.form.invalid || reason === '') {
      this.form.markAllAsTouched();
      return;
    }
    this.ref.close({ reason, ...(note.trim() ? { note: note.trim() } : {}) });
  }
}
