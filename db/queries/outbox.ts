// Messages received by the local fake SMTP server.
import { desc, eq, ilike } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { outboxMessages } from '../schema';

export type OutboxRow = typeof outboxMessages.$inferSelect;

export async function insertOutboxMessage(
  db: DbOrTx,
  params: { messageId: string | null; from: string; to: string; subject: string; text: string | null; html: string | null },
): Promise<OutboxRow> {
  const [row] = await db.insert(outboxMessages).values(params).returning();
  return row;
}

export async function listOutboxMessages(
  db: DbOrTx,
  params: { limit: number; to?: string },
): Promise<Pick<OutboxRow, 'id' | 'from' | 'to' | 'subject' | 'receivedAt'>[]> {
  const q = db
    .select({
      id: outboxMessages.id,
      from: outboxMessages.from,
      to: outboxMessages.to,
      subject: outboxMessages.subject,
      receivedAt: outboxMessages.receivedAt,
    })
    .from(outboxMessages)
    .$dynamic();
  if (params.to) q.where(ilike(outboxMessages.to, `%${escapeLike(params.to)}%`));
  return q.orderBy(desc(outboxMessages.receivedAt), desc(outboxMessages.id)).limit(params.limit);
}

export async function getOutboxMessage(db: DbOrTx, params: { id: number }): Promise<OutboxRow | undefined> {
  const [row] = await db.select().from(outboxMessages).where(eq(outboxMessages.id, params.id));
  return row;
}

function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => `\\${c}`);
}
