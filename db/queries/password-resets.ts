// Password-reset tokens (stored as SHA-256 hashes only).
import { and, eq, isNull } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { passwordResets } from '../schema';

export type PasswordResetRow = typeof passwordResets.$inferSelect;

export async function createPasswordReset(
  db: DbOrTx,
  params: { personId: number; tokenHash: string; expiresAt: Date },
): Promise<PasswordResetRow> {
  const [row] = await db.insert(passwordResets).values(params).returning();
  return row;
}

export async function findPasswordResetByTokenHash(
  db: DbOrTx,
  params: { tokenHash: string; forUpdate?: boolean },
): Promise<PasswordResetRow | undefined> {
  const q = db.select().from(passwordResets).where(eq(passwordResets.tokenHash, params.tokenHash));
  const [row] = params.forUpdate ? await q.for('update') : await q;
  return row;
}

/** Marks this token used and voids the person's other open reset links. */
export async function usePasswordResets(db: DbOrTx, params: { personId: number; at: Date }): Promise<void> {
  await db
    .update(passwordResets)
    .set({ usedAt: params.at })
    .where(and(eq(passwordResets.personId, params.personId), isNull(passwordResets.usedAt)));
}
