import type { Queryable } from '@tierscope/db';
import { schema } from '@tierscope/db';

export interface AuditEntry {
  farmId: number | null;
  actorUserId: number | null;
  action: string;
  entity: string;
  entityId: string | number;
  before?: unknown;
  after?: unknown;
}

/** Writes one audit event inside the caller's transaction, so the change and its record land together. */
export async function recordAudit(tx: Queryable, entry: AuditEntry): Promise<void> {
  await tx.insert(schema.auditEvents).values({
    farmId: entry.farmId,
    actorUserId: entry.actorUserId,
    action: entry.action,
    entity: entry.entity,
    entityId: String(entry.entityId),
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}
