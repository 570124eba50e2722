// Test data made straight in the test database (through the stack's pool) for the cases where the
// e-mail round trip is not what is under test: throwaway people, invitation and reset tokens.
import { createHash, randomBytes } from 'node:crypto';
import type pg from 'pg';

export const DEMO_PASSWORD = 'tarrow-demo-2026';
export const ROLE_EMAIL = {
  admin: 'admin@tarrow.example',
  engineer: 'engineer@tarrow.example',
  operator: 'operator@tarrow.example',
  planner: 'planner@tarrow.example',
} as const;

let n = 0;
export const unique = (stem: string) => `${stem}-${Date.now().toString(36)}-${(n++).toString(36)}`;

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

/** A person who cannot sign in (the hash is not a valid scrypt string). */
export async function insertPerson(pool: pg.Pool, role = 'planner'): Promise<number> {
  const email = `${unique('someone')}@tarrow.example`;
  const r = await pool.query(
    `insert into people (email, display_name, role, password_hash) values ($1, 'Throwaway', $2, 'x') returning id`,
    [email, role],
  );
  return r.rows[0].id as number;
}

/** A pending invitation whose token the test knows. */
export async function insertInvitation(pool: pg.Pool, role = 'planner'): Promise<{ id: number; token: string; email: string }> {
  const token = randomBytes(32).toString('base64url');
  const email = `${unique('invitee')}@tarrow.example`;
  const r = await pool.query(
    `insert into invitations (token_hash, email, role, expires_at) values ($1, $2, $3, now() + interval '1 hour') returning id`,
    [sha256(token), email, role],
  );
  return { id: r.rows[0].id as number, token, email };
}

/** A reset link for a throwaway person. */
export async function insertPasswordReset(pool: pg.Pool): Promise<{ token: string; personId: number }> {
  const personId = await insertPerson(pool);
  const token = randomBytes(32).toString('base64url');
  await pool.query(`insert into password_resets (token_hash, person_id, expires_at) values ($1, $2, now() + interval '1 hour')`, [
    sha256(token),
    personId,
  ]);
  return { token, personId };
}

/** Rows of every table except the session store (what a refused request must not change). */
export async function rowCounts(pool: pg.Pool): Promise<Record<string, number>> {
  const tables = await pool.query<{ table_name: string }>(
    `select table_name from information_schema.tables
      where table_schema = 'public' and table_type = 'BASE TABLE' and table_name <> 'session' order by table_name`,
  );
  const out: Record<string, number> = {};
  for (const { table_name } of tables.rows) {
    const r = await pool.query(`select count(*)::int as n from "${table_name}"`);
    out[table_name] = r.rows[0].n as number;
  }
  return out;
}

export async function waitFor<T>(fn: () => Promise<T | undefined | null | false>, what: string, timeoutMs = 30_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() - t0 > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
