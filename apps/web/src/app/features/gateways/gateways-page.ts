import { ChangeDetectionStrategy, Component, inject, viewChild } from '@angular/core';
import { DatePipe } from '@angular/common';
import {
  FormGroupDirective,
  NonNullableFormBuilder,
  ReactiveFormsModule,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { gatewayCreateSchema, type Gateway } from '@tierscope/contracts';
import { describeApiError } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { GatewaysStore } from './gateways-store';

/** Integrators' and admins' gateways: a key per farm gateway, shown once, revocable. */
@Component({
  selector: 'ts-gateways-page',
  imports: [
    DatePipe,
    RouterLink,
    ReactiveFormsModule,
    MatTableModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    LoadState,
  ],
  templateUrl: './gateways-page.html',
  styleUrl: './gateways-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class GatewaysPage {
  protected readonly store = inject(GatewaysStore);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly columns = [
    'name',
    'keyPrefix',
    'createdAt',
    'lastUsedAt',
    'status',
    'actions',
  ];

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, zodValidator(gatewayCreateSchema.shape.name)]],
  });
  private readonly formDirective = viewChild.required(FormGroupDirective);
  protected readonly firstError = firstError;

  protected async create(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    try {
      await this.store.create(this.form.getRawValue());
      // Reset the submitted state too, so the emptied field does not show an error.
      this.formDirective().resetForm();
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected async copyKey(key: string): Promise<void> {
    try {
      await navigator.clipboard.writeText(key);
      this.snackBar.open('Key copied', undefined, { duration: 2000 });
    } catch {
      // Clipboard refused (no permission or not a secure context): the key stays on screen to select.
      this.snackBar.open('Copying is not allowed here: select the key and copy it', 'Dismiss');
    }
  }

  protected async revoke(gateway: Gateway): Promise<void> {
    if (!confirm(`Revoke the key of "${gateway.name}"? Its gateway can no longer send counts.`))
      return;
    try {
      await this.store.revoke(gateway);
      this.snackBar.open(`${gateway.name}: key revoked`, undefined, { duration: 3000 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
