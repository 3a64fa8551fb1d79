import { computed, inject, Injectable, signal } from '@angular/core';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { MailboxApi } from './mailbox-api';

/** The mailbox page's state: the mails the demo's catcher holds, and the one opened. */
@Injectable()
export class MailboxStore {
  private readonly api = inject(MailboxApi);

  readonly mail = this.api.mail();
  readonly openId = signal<number | null>(null);
  readonly loadStatus = computed(() => listState(this.mail));
  readonly errorText = computed(() => describeApiError(this.mail.error()));
}
