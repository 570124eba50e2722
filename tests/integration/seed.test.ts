// The migrate and seed entry points against a stack database that already holds the Tarrow demo:
// both are idempotent (exit 0, nothing changes, not even an id sequence).
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '../../db/seed';
import { rowCounts } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const root = path.resolve(__dirname, '..', '..');
const tsx = path.join(root, 'node_modules', '.bin', 'tsx');

let stack: Stack;
beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
});
afterAll(async () => {
  await stack?.stop();
});

const run = (file: string) => spawnSync(tsx, [file], { cwd: root, env: { ...process.env, DATABASE_URL: stack.databaseUrl }, encoding: 'utf8' });

async function sequences(): Promise<Record<string, number>> {
  const r = await stack.pool.query(`select sequencename as name, coalesce(last_value, 0)::bigint as v from pg_sequences where schemaname = 'public'`);
  return Object.fromEntries(r.rows.map((x) => [x.name, Number(x.v)]));
}

describe('migrate and seed', () => {
  it('a second migrate and seed change nothing', async () => {
    const counts = await rowCounts(stack.pool);
    const seqs = await sequences();
    const people = (await stack.pool.query(`select email, password_hash from people order by id`)).rows;
    const m = run('db/migrate.ts');
    expect(m.status, m.stderr).toBe(0);
    const s = run('scripts/seed.ts');
    expect(s.status, s.stderr).toBe(0);
    expect(s.stdout).toContain('nothing to add');
    expect(await rowCounts(stack.pool)).toEqual(counts);
    expect(await sequences()).toEqual(seqs);
    expect((await stack.pool.query(`select email, password_hash from people order by id`)).rows).toEqual(people);
  });

  it('seeds one demo person per role', async () => {
    const r = await stack.pool.query(`select email, role from people order by id`);
    expect(r.rows).toEqual(DEMO_PEOPLE.map((p) => ({ email: p.email, role: p.role })));
    expect(new Set(DEMO_PEOPLE.map((p) => p.role))).toEqual(new Set(['admin', 'engineer', 'operator', 'planner']));
  });

  it('puts back only what is missing', async () => {
    await stack.pool.query(`delete from channels where name = 'windlow.freq'`);
    const s = run('scripts/seed.ts');
    expect(s.status, s.stderr).toBe(0);
    expect(s.stdout).toContain('[seed] added 1 channels');
    expect((await stack.pool.query(`select count(*)::int as n from channels where name = 'windlow.freq'`)).rows[0].n).toBe(1);
  });
});
