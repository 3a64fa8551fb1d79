import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { type User, endpoints } from '@tierscope/contracts';
import { can } from '@tierscope/domain';
import { firstValueFrom } from 'rxjs';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { UserDialog, type UserDialogData } from './user-dialog';
import { ApiClient } from '../../core/http/api-client';

/** Administrators' list of the people on their farms and their roles. */
@Component({
  selector: 'ts-users-page',
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatSlideToggleModule, LoadState],
  templateUrl: './users-page.html',
  styleUrl: './users-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UsersPage {
  private readonly auth = inject(AuthStore);
  private readonly api = inject(ApiClient);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly users = this.api.resource(endpoints.users.list, () => ({}));
  protected readonly state = computed(() => listState(this.users));
  protected readonly errorText = computed(() => describeApiError(this.users.error()));
  protected readonly columns = ['name', 'email', 'roles', 'active', 'actions'];
  private readonly adminFarms = computed(() =>
    this.auth.memberships().filter((m) => can(m.role, 'users.manage')),
  );
  protected readonly myId = computed(() => this.auth.user()?.id);

  protected rolesOf(user: User): string {
    const names = new Map(this.auth.memberships().map((m) => [m.farmId, m.farmName]));
    return user.memberships
      .map((m) => `${names.get(m.farmId) ?? `Farm ${m.farmId}`}: ${m.role}`)
      .join(', ');
  }

  protected async openDialog(user?: User): Promise<void> {
    const data: UserDialogData = { farms: this.adminFarms(), ...(user ? { user } : {}) };
    const saved = await firstValueFrom(
      this.dialog.open<UserDialog, UserDialogData, User>(UserDialog, { data }).afterClosed(),
    );
    if (saved) {
      this.snackBar.open(`${saved.name} saved`, undefined, { duration: 3000 });
      this.users.reload();
    }
  }

  protected async setActive(user: User, isActive: boolean): Promise<void> {
    try {
      await this.api.call(endpoints.users.update, {
        params: { userId: user.id },
        body: { disabled: !isActive },
      });
      this.snackBar.open(
        `${user.name} ${isActive ? 'can sign in again' : 'can no longer sign in'}`,
        undefined,
        {
          duration: 3000,
        },
      );
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
    this.users.reload();
  }
}
