import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSnackBar } from '@angular/material/snack-bar';
import type { Farm } from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import { AuthStore } from '../../core/auth/auth-store';
import { LoadState } from '../../shared/ui/load-state';
import { FarmHouses } from './farm-houses';
import { FarmSettingsDialog } from './farm-settings-dialog';
import { FarmsStore } from './farms-store';

/** Every farm the user belongs to, each with its houses; an administrator also opens a farm's settings. */
@Component({
  selector: 'ts-farms-page',
  imports: [FarmHouses, LoadState, MatButtonModule, MatIconModule],
  templateUrl: './farms-page.html',
  styleUrl: './farms-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsPage {
  protected readonly store = inject(FarmsStore);
  private readonly auth = inject(AuthStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected canChange(farm: Farm): boolean {
    return this.auth.hasPermission('farm.update', farm.id);
  }

  protected async openSettings(farm: Farm): Promise<void> {
    const saved = await firstValueFrom(
      this.dialog
        .open<FarmSettingsDialog, Farm, Farm>(FarmSettingsDialog, { data: farm })
        .afterClosed(),
    );
    if (!saved) return;
    this.store.farms.reload();
    this.snackBar.open(`${saved.name}: settings saved`, undefined, { duration: 3000 });
  }
}
