// People and their sessions.
import { and, asc, count, eq, sql } from 'drizzle-orm';
import type { DbOrTx } from '../client';
import { people, sessions } from '../schema';

export type PersonRow = typeof people.$inferSelect;
export type Role = PersonRow['role'];

export async function findPersonByEmail(db: DbOrTx, params: { email: string }): Promise<PersonRow | undefined> {
  const [row] = await db.select().from(people).where(eq(people.email, params.email.trim().toLowerCase()));
  return row;
}

export async function findPersonById(db: DbOrTx, params: { id: number }): Promise<PersonRow | undefined> {
  const [row] = await db.select().from(people).where(eq(people.id, params.id));
  return row;
}

export async function listPeople(db: DbOrTx): Promise<PersonRow[]> {
  return db.select().from(people).orderBy(asc(people.displayName), asc(people.id));
}

export async function createPerson(
  db: DbOrTx,
  params: { email: string; displayName: string; role: Role; passwordHash: string },
): Promise<PersonRow> {
  const [row] = await db
    .insert(people)
    .values({ ...params, email: params.email.trim().toLowerCase() })
    .returning();
  return row;
}

export async function updatePerson(
  db: DbOrTx,
  params: { id: number; role?: Role; disabled?: boolean; passwordHash?: string; displayName?: string },
): Promise<PersonRow | undefined> {
  const { id, ...changes } = params;
  const [row] = await db
    .update(people)
    .set({ ...changes, updatedAt: new Date() })
    .where(eq(people.id, id))
    .returning();
  return row;
}

/** Administrators who can still sign in (the last one may not be demoted or disabled). */
export async function countActiveAdmins(db: DbOrTx): Promise<number> {
  const [row] = await db
    .select({ n: count() })
    .from(people)
    .where(and(eq(people.role, 'admin'), eq(people.disabled, false)));
  return row.n;
}

/**
 * End every session of a person (connect-pg-simple keeps passport's serialised user id at
 * sess.passport.user). Returns how many sessions ended.
 */
export async function deleteSessionsOfPerson(db: DbOrTx, params: { personId: number }): Promise<number> {
  const rows = await db
    .delete(sessions)
    .where(sql`(${sessions.sess}::jsonb -> 'passport' ->> 'user') = ${String(params.personId)}`)
    .returning({ sid: sessions.sid });
  return rows.length;
}

/**
 * Lock the rows of the active administrators for the rest of the transaction, so two concurrent
 * demotions cannot both pass the "at least one administrator stays" check.
 */
export async function lockActiveAdmins(db: DbOrTx): Promise<number[]> {
  const rows = await db
    .select({ id: people.id })
    .from(people)
    .where(and(eq(people.role, 'admin'), eq(people.disabled, false)))
    .for('update');
  return rows.map((r) => r.id);
}
