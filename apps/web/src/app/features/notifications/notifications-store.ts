import { computed, inject, Injectable, signal } from '@angular/core';
import type { NotificationSettings } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { loadStatus } from '../../shared/ui/load-state';
import { NotificationsApi } from './notifications-api';

/** The notifications page's state: the user's mail choices and saving one. */
@Injectable()
export class NotificationsStore {
  private readonly api = inject(NotificationsApi);
  private readonly auth = inject(AuthStore);

  readonly settings = this.api.settings();
  readonly loadStatus = computed(() => loadStatus(this.settings));
  readonly errorText = computed(() => describeApiError(this.settings.error()));
  readonly email = computed(() => this.auth.user()?.email ?? '');
  readonly isSaving = signal(false);

  /** Saves one choice at once; when refused, the choices are read again so the switch shows the truth. */
  async save(key: keyof NotificationSettings, value: boolean): Promise<void> {
    this.isSaving.set(true);
    try {
      this.settings.set(await this.api.save({ [key]: value }));
    } catch (error) {
      this.settings.reload();
      throw error;
    } finally {
      this.isSaving.set(false);
    }
  }
}
