// Invitations (tokens stored as SHA-256 hashes only).
import { and, desc, eq, isNull } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { invitations, people } from '../schema';

export type InvitationRow = typeof invitations.$inferSelect;
export type InvitationWithInviter = InvitationRow & { inviterName: string | null };

export async function createInvitation(
  db: DbOrTx,
  params: { email: string; role: InvitationRow['role']; tokenHash: string; invitedBy: number | null; expiresAt: Date },
): Promise<InvitationRow> {
  const [row] = await db.insert(invitations).values(params).returning();
  return row;
}

export async function listInvitations(db: DbOrTx, params: { limit?: number } = {}): Promise<InvitationWithInviter[]> {
  const rows = await db
    .select({ inv: invitations, inviterName: people.displayName })
    .from(invitations)
    .leftJoin(people, eq(people.id, invitations.invitedBy))
    .orderBy(desc(invitations.createdAt), desc(invitations.id))
    .limit(params.limit ?? 200);
  return rows.map((r) => ({ ...r.inv, inviterName: r.inviterName }));
}

export async function getInvitation(db: DbOrTx, params: { id: number }): Promise<InvitationWithInviter | undefined> {
  const [r] = await db
    .select({ inv: invitations, inviterName: people.displayName })
    .from(invitations)
    .leftJoin(people, eq(people.id, invitations.invitedBy))
    .where(eq(invitations.id, params.id));
  return r ? { ...r.inv, inviterName: r.inviterName } : undefined;
}

/** Locks the row (FOR UPDATE) so two accepts of the same link cannot both succeed. */
export async function findInvitationByTokenHash(
  db: DbOrTx,
  params: { tokenHash: string; forUpdate?: boolean },
): Promise<InvitationRow | undefined> {
  const q = db.select().from(invitations).where(eq(invitations.tokenHash, params.tokenHash));
  const [row] = params.forUpdate ? await q.for('update') : await q;
  return row;
}

export async function markInvitationUsed(db: DbOrTx, params: { id: number; personId: number; at: Date }): Promise<void> {
  await db.update(invitations).set({ usedAt: params.at, personId: params.personId }).where(eq(invitations.id, params.id));
}

export async function revokeInvitation(db: DbOrTx, params: { id: number; at: Date }): Promise<InvitationRow | undefined> {
  const [row] = await db
    .update(invitations)
    .set({ revokedAt: params.at })
    .where(and(eq(invitations.id, params.id), isNull(invitations.usedAt), isNull(invitations.revokedAt)))
    .returning();
  return row;
}

/** A new invitation for an address replaces the older unused ones (only the newest link works). */
export async function revokePendingInvitationsFor(db: DbOrTx, params: { email: string; at: Date }): Promise<number> {
  const rows = await db
    .update(invitations)
    .set({ revokedAt: params.at })
    .where(and(eq(invitations.email, params.email), isNull(invitations.usedAt), isNull(invitations.revokedAt)))
    .returning({ id: invitations.id });
  return rows.length;
}

export function invitationStatus(row: InvitationRow, now: Date): 'pending' | 'used' | 'expired' | 'revoked' {
  if (row.usedAt) return 'used';
  if (row.revokedAt) return 'revoked';
  if (row.expiresAt.getTime() <= now.getTime()) return 'expired';
  return 'pending';
}
