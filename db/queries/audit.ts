// The audit trail: who did what to what, when, from where.
import { desc } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { auditLog } from '../schema';

export type AuditRow = typeof auditLog.$inferSelect;

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

export async function listAudit(db: DbOrTx, params: { limit?: number } = {}): Promise<AuditRow[]> {
  return db
    .select()
    .from(auditLog)
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(params.limit ?? 100);
}
