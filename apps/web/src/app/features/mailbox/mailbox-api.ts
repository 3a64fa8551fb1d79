import { inject, Injectable } from '@angular/core';
import { endpoints } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The local mail catcher's mailbox, as the API relays it. */
@Injectable({ providedIn: 'root' })
export class MailboxApi {
  private readonly api = inject(ApiClient);

  mail() {
    return this.api.resource(endpoints.notifications.mailbox, () => ({}));
  }
}
