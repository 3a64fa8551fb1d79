import {
  caughtMailSchema,
  notificationSettingsUpdateSchema,
  type CaughtMail,
} from '@tierscope/contracts';
import { Router } from 'express';
import { z } from 'zod';
import { farmsWith } from '../../platform/access';
import { contextOf } from '../../platform/auth';
import { AppError, forbidden, parseInput } from '../../platform/errors';
import type { Database } from '@tierscope/db';
import { saveSettings, settingsOf } from './notifications.repository';

/** Each user's own mail choices, and the admin-only view of the local mail catcher. */
export function notificationsRoutes(db: Database, mailCatcherUrl: string | undefined): Router {
  const router = Router();
  router.get('/me/notifications', async (req, res) => {
    res.json(await settingsOf(db, contextOf(req).user.id));
  });
  router.put('/me/notifications', async (req, res) => {
    const ctx = contextOf(req);
    const patch = parseInput(notificationSettingsUpdateSchema, req.body);
    const next = { ...(await settingsOf(db, ctx.user.id)), ...patch };
    await saveSettings(db, ctx.user.id, next);
    res.json(next);
  });
  router.get('/dev/mailbox', async (req, res) => {
    if (farmsWith(contextOf(req), 'users.manage').length === 0) {
      throw forbidden('Only administrators read the mailbox');
    }
    if (!mailCatcherUrl) {
      throw new AppError(
        'not_found',
        'The mailbox exists only while the local mail catcher is the configured transport',
      );
    }
    res.json(await readCatcher(mailCatcherUrl));
  });
  return router;
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
