// The audit trail: who did what to what, when, from where.
import type { DbOrTx } from '../client';
import { auditLog } from '../schema';

export interface AuditEntry {
  personId: number | null;
  action: string;
  target?: string | null;
  details?: Record<string, unknown>;
  ip?: string | null;
}

export async function recordAudit(db: DbOrTx, params: AuditEntry): Promise<void> {
  await db.insert(auditLog).values({
    personId: params.personId,
    action: params.action,
    target: params.target ?? null,
    details: params.details ?? {},
    ip: params.ip ?? null,
  });
}
