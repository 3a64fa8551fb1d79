import { inject, Injectable } from '@angular/core';
import { endpoints, type NotificationSettings } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The signed-in user's mail choices. */
@Injectable({ providedIn: 'root' })
export class NotificationsApi {
  private readonly api = inject(ApiClient);

  settings() {
    return this.api.resource(endpoints.notifications.settings, () => ({}));
  }

  save(changes: Partial<NotificationSettings>): Promise<NotificationSettings> {
    return this.api.call(endpoints.notifications.saveSettings, { body: changes });
  }
}
