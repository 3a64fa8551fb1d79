import type { Database } from '@tierscope/db';
import { claimLease as claim, releaseLease } from './cluster.repository';

/** How long a held lease lasts without renewal: a process that dies blocks its work for at most this. */
export const LEASE_MS = 60_000;
/** How often a process waiting for a lease asks again. */
const POLL_MS = 200;

/** Claims the lease `name` for `holder` (see cluster.repository.ts), for LEASE_MS by default. */
export function claimLease(
  db: Database,
  name: string,
  holder: string,
  ms = LEASE_MS,
): Promise<boolean> {
  return claim(db, name, holder, ms);
}

/**
 * Runs `work` while holding the lease `name`, renewed as it runs and released after: at most one process
 * of the cluster runs work under one name at a time. Waits for the lease up to `waitMs`, then gives up
 * (returns `{ ran: false }`) — a house another process is evaluating right now needs no second evaluation.
 */
export async function withLease<T>(
  db: Database,
  name: string,
  holder: string,
  work: () => Promise<T>,
  { waitMs = 0, leaseMs = LEASE_MS }: { waitMs?: number; leaseMs?: number } = {},
): Promise<{ ran: true; value: T } | { ran: false }> {
  const giveUpAt = Date.now() + waitMs;
  while (!(await claimLease(db, name, holder, leaseMs))) {
    if (Date.now() >= giveUpAt) return { ran: false };
    await new Promise((resolve) => setTimeout(resolve, POLL_MS));
  }
  // Renewed three times per lease: a slow renewal or two never lets the lease run out under running work.
  const renew = setInterval(() => {
    claimLease(db, name, holder, leaseMs).catch(() => undefined);
  }, leaseMs / 3);
  renew.unref();
  try {
    return { ran: true, value: await work() };
  } finally {
    clearInterval(renew);
    await releaseLease(db, name, holder).catch(() => undefined);
  }
}
