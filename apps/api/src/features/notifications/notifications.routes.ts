import { caughtMailSchema, type CaughtMail } from '@tierscope/contracts';
import { endpoints } from '@tierscope/contracts';
import { z } from 'zod';
import { farmsWith } from '../../platform/access';
import { contextOf } from '../../platform/auth';
import { AppError, forbidden } from '../../platform/errors';
import { declareRoutes, route } from '../../platform/route';
import type { Database } from '@tierscope/db';
import { saveSettings, settingsOf } from './notifications.repository';

/** Each user's own mail choices, and the admin-only view of the local mail catcher. */
export function notificationsRoutes(db: Database, mailCatcherUrl: string | undefined) {
  return declareRoutes('Mail', [
    route({
      ...endpoints.notifications.settings,
      handle: ({ req }) => settingsOf(db, contextOf(req).user.id),
    }),
    route({
      ...endpoints.notifications.saveSettings,
      handle: async ({ req, body }) => {
        const ctx = contextOf(req);
        const next = { ...(await settingsOf(db, ctx.user.id)), ...body };
        await saveSettings(db, ctx.user.id, next);
        return next;
      },
    }),
    route({
      ...endpoints.notifications.mailbox,
      handle: ({ req }) => {
        if (farmsWith(contextOf(req), 'users.manage').length === 0) {
          throw forbidden('Only administrators read the mailbox');
        }
        if (!mailCatcherUrl) {
          throw new AppError(
            'not_found',
            'The mailbox exists only while the local mail catcher is the configured transport',
          );
        }
        return readCatcher(mailCatcherUrl);
      },
    }),
  ]);
}

async function readCatcher(base: string): Promise<CaughtMail[]> {
  let response: Response;
  try {
    response = await fetch(`${base}/messages`, { signal: AbortSignal.timeout(5000) });
  } catch {
    // The catcher is a separate local process: when it is down, say so rather than fail obscurely.
    throw new AppError('unavailable', 'The local mail catcher is not answering');
  }
  if (!response.ok) throw new AppError('unavailable', 'The local mail catcher is not answering');
  return z.array(caughtMailSchema).parse(await response.json());
}
