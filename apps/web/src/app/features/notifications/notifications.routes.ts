import type { Routes } from '@angular/router';
import { NotificationsPage } from './notifications-page';
import { NotificationsStore } from './notifications-store';

export default [
  {
    path: '',
    title: 'Notifications · Tierscope',
    providers: [NotificationsStore],
    component: NotificationsPage,
  },
] satisfies Routes;
