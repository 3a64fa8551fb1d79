import { z } from 'zod';
import { endpoint } from './endpoint';
import { caughtMailSchema } from './mail.schema';
import {
  notificationSettingsSchema,
  notificationSettingsUpdateSchema,
} from './notification.schema';

export const notificationsEndpoints = {
  settings: endpoint({
    method: 'get',
    path: '/me/notifications',
    summary: 'Which mails I get',
    answer: notificationSettingsSchema,
  }),
  saveSettings: endpoint({
    method: 'put',
    path: '/me/notifications',
    summary: 'Choose which mails I get',
    body: notificationSettingsUpdateSchema,
    answer: notificationSettingsSchema,
  }),
  mailbox: endpoint({
    method: 'get',
    path: '/dev/mailbox',
    summary:
      'What the local mail catcher caught (admins; only while it is the configured transport)',
    permission: 'users.manage',
    answer: z.array(caughtMailSchema),
    errors: { 503: 'The local mail catcher is not answering' },
  }),
};
