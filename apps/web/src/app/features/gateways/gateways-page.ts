import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  linkedSignal,
  signal,
  viewChild,
} from '@angular/core';
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
import {
  gatewayCreateSchema,
  type Gateway,
  type GatewayCreated,
  endpoints,
} from '@tierscope/contracts';
import { can } from '@tierscope/domain';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { ApiClient } from '../../core/http/api-client';

/** Integrators' and admins' gateways: a key per farm gateway, shown once, revocable. */
@Component({
  selector: 'ts-gateways-page',
  imports: [
    DatePipe,
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
  private readonly auth = inject(AuthStore);
  private readonly api = inject(ApiClient);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly farms = computed(() =>
    this.auth.memberships().filter((m) => can(m.role, 'gateways.manage')),
  );
  protected readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  protected readonly gateways = this.api.resource(endpoints.gateways.list, () => {
    const farmId = this.farmId();
    return farmId === null ? undefined : { params: { farmId } };
  });
  protected readonly state = computed(() => listState(this.gateways));
  protected readonly errorText = computed(() => describeApiError(this.gateways.error()));
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
  protected readonly isCreating = signal(false);
  /** The key of the gateway just made: shown once, never again. */
  protected readonly newKey = signal<GatewayCreated | null>(null);

  protected async create(): Promise<void> {
    const farmId = this.farmId();
    if (farmId === null) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.isCreating.set(true);
    try {
      const created = await this.api.call(endpoints.gateways.create, {
        params: { farmId },
        body: this.form.getRawValue(),
      });
      this.newKey.set(created);
      // Reset the submitted state too, so the emptied field does not show an error.
      this.formDirective().resetForm();
      this.gateways.reload();
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    } finally {
      this.isCreating.set(false);
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
      await this.api.call(endpoints.gateways.revoke, { params: { gatewayId: gateway.id } });
      this.snackBar.open(`${gateway.name}: key revoked`, undefined, { duration: 3000 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
    this.gateways.reload();
  }
}
