import { createHash, randomBytes } from 'node:crypto';
import type { Database } from '@tierscope/db';
import type { FindingCause } from '@tierscope/domain';
import type { Mailer } from '../../platform/mailer';
import {
  invitationMail,
  newExceptionsMail,
  passwordResetMail,
  workOrderAssignedMail,
  workOrderDoneMail,
  type WorkOrderForMail,
} from './mail-messages';
import {
  claimExceptionsToMail,
  farmRecipients,
  insertUserToken,
  releaseExceptions,
  userRecipient,
} from './notifications.repository';

export const INVITATION_HOURS = 72;
export const RESET_MINUTES = 60;

/** SHA-256 of a mailed link's token: the database holds only this, never the token. */
export function hashLinkToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

/**
 * Who gets which mail, and when. Mails go out after the change that caused them has committed; a failed
 * send is logged and never fails the request. New exceptions are gathered and mailed per house on a timer.
 */
export interface Notifier {
  /** Mails every exception nobody was told about yet, one mail per house; answers how many mails went. */
  flushExceptions(): Promise<number>;
  workOrderAssigned(input: { order: WorkOrderForMail; assigneeId: number; by: string }): void;
  workOrderDone(input: {
    order: WorkOrderForMail;
    creatorId: number;
    by: string;
    cause: FindingCause | null;
    notes: string;
  }): void;
  /** A single-use link to choose a first password. */
  invite(input: { userId: number; invitedBy: string; farmNames: string[] }): Promise<void>;
  /** A single-use link to choose a new password; nothing for a disabled or unknown user. */
  passwordReset(userId: number): Promise<void>;
  /** Resolves when every mail started so far has been handed to SMTP (or failed). */
  idle(): Promise<void>;
  start(): void;
  dispose(): void;
}

export function createNotifier(options: {
  db: Database;
  mailer: Mailer;
  publicUrl: string;
  exceptionMailSeconds: number;
  log: (message: string, error?: unknown) => void;
}): Notifier {
  const { db, mailer, publicUrl, log } = options;
  const pending = new Set<Promise<unknown>>();
  let timer: NodeJS.Timeout | null = null;
  let flushing: Promise<number> | null = null;

  function track(work: Promise<unknown>, what: string): void {
    const p = work.catch((error: unknown) => {
      log(`mail failed: ${what}`, error);
    });
    pending.add(p);
    void p.finally(() => pending.delete(p));
  }

  async function newLink(userId: number, purpose: 'invitation' | 'password_reset', ms: number) {
    const token = randomBytes(32).toString('base64url');
    await insertUserToken(db, {
      userId,
      purpose,
      tokenHash: hashLinkToken(token),
      expiresAt: new Date(Date.now() + ms),
    });
    return token;
  }

  async function flush(): Promise<number> {
    const claimed = await claimExceptionsToMail(db);
    const byHouse = new Map<number, typeof claimed>();
    for (const item of claimed) {
      byHouse.set(item.house.id, [...(byHouse.get(item.house.id) ?? []), item]);
    }
    let sent = 0;
    for (const [houseId, items] of byHouse) {
      const first = items[0];
      if (!first) continue;
      const ids = items.map((i) => i.exception.id);
      try {
        const recipients = await farmRecipients(
          db,
          first.exception.farmId,
          ['manager'],
          'newExceptions',
        );
        if (recipients.length === 0) continue;
        await mailer.send(
          newExceptionsMail({
            to: recipients.map((r) => r.email),
            publicUrl,
            farmName: first.house.farmName,
            houseId,
            houseName: first.house.name,
            timezone: first.house.timezone,
            exceptions: items
              .map((i) => i.exception)
              .sort((a, b) => a.openedAt.getTime() - b.openedAt.getTime()),
          }),
        );
        sent += 1;
      } catch (error) {
        // Not sent: give them back so the next flush tries again (still at most one mail each).
        log(`exception mail for house ${houseId} failed; will retry`, error);
        await releaseExceptions(db, ids);
      }
    }
    return sent;
  }

  return {
    flushExceptions() {
      // One flush at a time: a tick that comes while one runs waits for it instead of racing it.
      flushing ??= flush().finally(() => {
        flushing = null;
      });
      return flushing;
    },

    workOrderAssigned({ order, assigneeId, by }) {
      track(
        (async () => {
          const to = await userRecipient(db, assigneeId, 'workOrderAssigned');
          if (!to) return;
          await mailer.send(
            workOrderAssignedMail({ to: [to.email], publicUrl, order, assignedBy: by }),
          );
        })(),
        `work order ${order.id} assigned`,
      );
    },

    workOrderDone({ order, creatorId, by, cause, notes }) {
      track(
        (async () => {
          const to = await userRecipient(db, creatorId, 'workOrderDone');
          if (!to) return;
          await mailer.send(
            workOrderDoneMail({ to: [to.email], publicUrl, order, doneBy: by, cause, notes }),
          );
        })(),
        `work order ${order.id} done`,
      );
    },

    async invite({ userId, invitedBy, farmNames }) {
      const to = await userRecipient(db, userId, null);
      if (!to) return;
      const token = await newLink(userId, 'invitation', INVITATION_HOURS * 3600_000);
      track(
        mailer.send(
          invitationMail({
            to: to.email,
            name: to.name,
            publicUrl,
            token,
            invitedBy,
            farmNames,
            expiresHours: INVITATION_HOURS,
          }),
        ),
        `invitation of user ${userId}`,
      );
    },

    async passwordReset(userId) {
      const to = await userRecipient(db, userId, null);
      if (!to) return;
      const token = await newLink(userId, 'password_reset', RESET_MINUTES * 60_000);
      track(
        mailer.send(
          passwordResetMail({
            to: to.email,
            name: to.name,
            publicUrl,
            token,
            expiresMinutes: RESET_MINUTES,
          }),
        ),
        `password reset of user ${userId}`,
      );
    },

    async idle() {
      while (pending.size > 0) await Promise.all([...pending]);
    },

    start() {
      if (timer) return;
      timer = setInterval(() => {
        this.flushExceptions().catch((error: unknown) => {
          log('exception mail flush failed', error);
        });
      }, options.exceptionMailSeconds * 1000);
      timer.unref();
    },

    dispose() {
      if (timer) clearInterval(timer);
      timer = null;
    },
  };
}
