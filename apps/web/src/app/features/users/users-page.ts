import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { type User } from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import { describeApiError } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { UserDialog, type UserDialogData } from './user-dialog';
import { UsersStore } from './users-store';

/** Administrators' list of the people on their farms and their roles. */
@Component({
  selector: 'ts-users-page',
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatSlideToggleModule, LoadState],
  templateUrl: './users-page.html',
  styleUrl: './users-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UsersPage {
  protected readonly store = inject(UsersStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly columns = ['name', 'email', 'roles', 'active', 'actions'];

  protected async openDialog(user?: User): Promise<void> {
    const data: UserDialogData = { farms: this.store.adminFarms(), ...(user ? { user } : {}) };
    const saved = await firstValueFrom(
      this.dialog.open<UserDialog, UserDialogData, User>(UserDialog, { data }).afterClosed(),
    );
    if (saved) {
      this.snackBar.open(`${saved.name} saved`, undefined, { duration: 3000 });
      this.store.users.reload();
    }
  }

  protected async setActive(user: User, isActive: boolean): Promise<void> {
    try {
      await this.store.setActive(user, isActive);
      this.snackBar.open(
        `${user.name} ${isActive ? 'can sign in again' : 'can no longer sign in'}`,
        undefined,
        { duration: 3000 },
      );
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
