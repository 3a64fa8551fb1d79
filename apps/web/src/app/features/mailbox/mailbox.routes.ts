import type { Routes } from '@angular/router';
import { MailboxPage } from './mailbox-page';
import { MailboxStore } from './mailbox-store';

export default [
  { path: '', title: 'Mailbox · Tierscope', providers: [MailboxStore], component: MailboxPage },
] satisfies Routes;
