import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { currencyCode, farmName, type Farm } from '@tierscope/contracts';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { currencyChoices } from './currencies';
import { FarmsApi } from './farms-api';

/** A farm's own settings: its name, and the currency the value of eggs lost is counted in. */
@Component({
  selector: 'ts-farm-settings-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
  ],
  template: `
    <h2 mat-dialog-title>Settings of {{ farm.name }}</h2>
    <mat-dialog-content>
      <form [formGroup]="form" id="farm-form" (ngSubmit)="submit()" class="form" novalidate>
        <mat-form-field appearance="outline">
          <mat-label>Farm name</mat-label>
          <input matInput formControlName="name" maxlength="120" />
          <mat-error>{{ firstError(form.controls.name) }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Currency</mat-label>
          <mat-select formControlName="currency">
            @for (c of currencies; track c.code) {
              <mat-option [value]="c.code">{{ c.code }} · {{ c.name }}</mat-option>
            }
          </mat-select>
          <mat-hint>Eggs lost are valued in it, at each house's egg price</mat-hint>
          <mat-error>{{ firstError(form.controls.currency) }}</mat-error>
        </mat-form-field>
      </form>
      @if (errorText(); as message) {
        <p class="error" role="alert">{{ message }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" mat-dialog-close>Cancel</button>
      <button mat-flat-button type="submit" form="farm-form" [disabled]="isSaving()">
        {{ isSaving() ? 'Saving…' : 'Save' }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .form {
      display: flex;
      flex-direction: column;
      gap: 8px;
      padding-top: 8px;
      min-width: min(420px, 80vw);
    }
    .error {
      color: var(--mat-sys-error);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmSettingsDialog {
  protected readonly farm = inject<Farm>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<FarmSettingsDialog, Farm>);
  private readonly api = inject(FarmsApi);
  protected readonly currencies = currencyChoices(this.farm.currency);
  protected readonly form = inject(NonNullableFormBuilder).group({
    name: [this.farm.name, zodValidator(farmName)],
    currency: [this.farm.currency, zodValidator(currencyCode)],
  });
  protected readonly isSaving = signal(false);
  protected readonly errorText = signal<string | null>(null);
  protected readonly firstError = firstError;

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const { name, currency } = this.form.getRawValue();
    const changes = {
      ...(name.trim() !== this.farm.name ? { name } : {}),
      ...(currency !== this.farm.currency ? { currency } : {}),
    };
    if (Object.keys(changes).length === 0) {
      this.ref.close();
      return;
    }
    this.isSaving.set(true);
    this.errorText.set(null);
    try {
      this.ref.close(await this.api.update(this.farm.id, changes));
    } catch (error) {
      for (const [path, message] of Object.entries(fieldErrorsOf(error))) {
        const control = this.form.get(path);
        control?.setErrors({ server: message });
        control?.markAsTouched();
      }
      this.errorText.set(describeApiError(error));
    } finally {
      this.isSaving.set(false);
    }
  }
}
