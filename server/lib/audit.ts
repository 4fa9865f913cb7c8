import type { DbOrTx } from '../db/client';
import { auditLog } from '../db/schema';

export interface AuditEntry {
  userId: string | null;
  projectId?: string | null;
  entity: string;
  entityId: string;
  action: 'create' | 'update' | 'delete' | string;
  before?: unknown;
  after?: unknown;
}

/** Records who changed what; call it inside the transaction that makes the change. */
export async function audit(tx: DbOrTx, entry: AuditEntry): Promise<void> {
  await tx.insert(auditLog).values({
    userId: entry.userId,
    projectId: entry.projectId ?? null,
    entity: entry.entity,
    entityId: entry.entityId,
    action: entry.action,
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}
