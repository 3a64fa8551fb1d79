import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { type NotificationSettings } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { NotificationsStore } from './notifications-store';

interface Choice {
  key: keyof NotificationSettings;
  label: string;
  detail: string;
  /** shown only to people who would get it */
  isForMe: () => boolean;
}

/** Each person's own choice of which mails Tierscope sends them. */
@Component({
  selector: 'ts-notifications-page',
  imports: [MatSlideToggleModule, LoadState],
  template: `
    <div class="ts-page narrow">
      <h1 class="ts-page-title">Notifications</h1>
      <p class="ts-muted">Mail goes to {{ store.email() }}. Changes are saved at once.</p>
      <ts-load-state
        [state]="store.loadStatus()"
        loadingText="Loading your choices…"
        [errorText]="store.errorText()"
        (retry)="store.settings.reload()"
      />
      @if (store.settings.value(); as current) {
        <ul class="choices">
          @for (c of choices; track c.key) {
            <li>
              <mat-slide-toggle
                [checked]="current[c.key]"
                [disabled]="store.isSaving()"
                (change)="save(c.key, $event.checked)"
                >{{ c.label }}</mat-slide-toggle
              >
              <p class="ts-muted">
                {{ c.detail }}
                @if (!c.isForMe()) {
                  <em>Your roles do not get this mail now.</em>
                }
              </p>
            </li>
          }
        </ul>
      }
    </div>
  `,
  styles: `
    .narrow {
      max-width: 640px;
    }
    .choices {
      list-style: none;
      padding: 0;
      margin: 0;
    }
    li {
      padding: 12px 0;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    p {
      margin: 4px 0 0 52px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationsPage {
  protected readonly store = inject(NotificationsStore);
  private readonly auth = inject(AuthStore);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly choices: Choice[] = [
    {
      key: 'newExceptions',
      label: 'New exceptions on my farms',
      detail:
        'Managers: one mail per house when rows or tiers start laying clearly less, gathered over a few minutes.',
      isForMe: () => this.auth.memberships().some((m) => m.role === 'manager'),
    },
    {
      key: 'workOrderAssigned',
      label: 'Work orders assigned to me',
      detail: 'A mail with a link when someone hands you a work order.',
      isForMe: () => this.auth.hasPermission('workOrders.work'),
    },
    {
      key: 'workOrderDone',
      label: 'Work orders I opened are done',
      detail: 'A mail with what was found when the crew marks your work order done.',
      isForMe: () => this.auth.hasPermission('workOrders.manage'),
    },
  ];

  protected async save(key: keyof NotificationSettings, value: boolean): Promise<void> {
    try {
      await this.store.save(key, value);
      this.snackBar.open('Saved', undefined, { duration: 1500 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
