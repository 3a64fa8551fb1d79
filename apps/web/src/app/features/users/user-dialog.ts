import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import {
  FormControl,
  NonNullableFormBuilder,
  ReactiveFormsModule,
  Validators,
  type ValidatorFn,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { userCreateSchema, type Membership, type User } from '@tierscope/contracts';
import { ROLES, type Role } from '@tierscope/domain';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { UsersApi } from './users-api';

export interface UserDialogData {
  /** Absent when adding a user. */
  user?: User;
  /** Farms the signed-in admin administers: the only ones they can give roles on. */
  farms: Membership[];
}

const fields = userCreateSchema.shape;

/** A validator that lets an empty value through and checks anything else. */
function emptyOr(validator: ValidatorFn): ValidatorFn {
  return (control) => (control.value === '' ? null : validator(control));
}

@Component({
  selector: 'ts-user-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './user-dialog.html',
  styles: `
    form {
      display: flex;
      flex-direction: column;
      gap: 4px;
      min-width: min(420px, 80vw);
    }
    h3 {
      font: var(--mat-sys-title-small);
      margin: 8px 0;
    }
    .error {
      color: var(--mat-sys-error);
      display: flex;
      gap: 6px;
      align-items: center;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserDialog {
  private readonly api = inject(UsersApi);
  private readonly dialogRef = inject(MatDialogRef<UserDialog, User>);
  protected readonly data = inject<UserDialogData>(MAT_DIALOG_DATA);
  protected readonly isEdit = this.data.user !== undefined;
  protected readonly roles = ROLES;
  protected readonly firstError = firstError;
  protected readonly isSaving = signal(false);
  protected readonly error = signal<string | null>(null);

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: [this.data.user?.email ?? '', [Validators.required, zodValidator(fields.email)]],
    name: [this.data.user?.name ?? '', [Validators.required, zodValidator(fields.name)]],
    // Empty: the user is mailed an invitation link and chooses their own password.
    password: ['', this.isEdit ? [] : [emptyOr(zodValidator(fields.password))]],
  });
  protected readonly roleControls = this.data.farms.map((farm) => ({
    farm,
    control: new FormControl<Role | ''>(
      this.data.user?.memberships.find((m) => m.farmId === farm.farmId)?.role ?? '',
      { nonNullable: true },
    ),
  }));

  protected async save(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const memberships = this.roleControls
      .filter((r) => r.control.value !== '')
      .map((r) => ({ farmId: r.farm.farmId, role: r.control.value as Role }));
    if (!this.isEdit && memberships.length === 0) {
      this.error.set('Give the user a role on at least one farm');
      return;
    }
    this.isSaving.set(true);
    this.error.set(null);
    try {
      const { email, name, password } = this.form.getRawValue();
      const saved = this.data.user
        ? await this.api.update(this.data.user.id, { name, memberships })
        : await this.api.create({
            email,
            name,
            ...(password === '' ? {} : { password }),
            memberships,
          });
      this.dialogRef.close(saved);
    } catch (error) {
      this.error.set(describeApiError(error));
      for (const [path, message] of Object.entries(fieldErrorsOf(error))) {
        this.form.get(path)?.setErrors({ server: message });
      }
    } finally {
      this.isSaving.set(false);
    }
  }
}
