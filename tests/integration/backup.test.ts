// Backup and restore as the README shows it: pg_dump of a stack's database in the custom format,
// pg_restore into a fresh database, then the same rows in every table (counted, and compared by a
// digest of their contents), and a Keel server started on the restored database serves the data.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { csvText, tarrowSeries } from '../fixtures-bad/make-files';
import { makeTmpDir } from '../fixtures-bad/harness';
import { createClient } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { uploadCsv } from './analysis-helpers';

/** Debian's PostgreSQL 15 client tools (the wrapper in /usr/bin picks the same). */
function pgTool(name: 'pg_dump' | 'pg_restore'): string {
  for (const p of [`/usr/lib/postgresql/15/bin/${name}`, `/usr/bin/${name}`]) if (fs.existsSync(p)) return p;
  throw new Error(`${name} not found (install Debian's postgresql-client-15)`);
}

function run(tool: string, args: string[]): string {
  const r = spawnSync(tool, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${path.basename(tool)} ${args.join(' ')} exited with ${r.status}: ${r.stderr}`);
  return r.stderr;
}

let stack: Stack;
let dir: string;
let restoredDb = '';
const adminUrl = () => process.env.KEEL_TEST_PG_ADMIN_URL!;

interface TableState {
  rows: number;
  digest: string;
}

/** Every table of every schema but the system ones: row count and a digest of all rows. */
async function tableStates(databaseUrl: string): Promise<Record<string, TableState>> {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    const tables = await c.query<{ schema: string; name: string }>(
      `select table_schema as schema, table_name as name from information_schema.tables
        where table_type = 'BASE TABLE' and table_schema not in ('pg_catalog', 'information_schema') order by 1, 2`,
    );
    const out: Record<string, TableState> = {};
    for (const { schema, name } of tables.rows) {
      const q = `select count(*)::int as rows, coalesce(md5(string_agg(t::text, E'\\n' order by t::text)), '') as digest from "${schema}"."${name}" t`;
      const r = await c.query<TableState>(q);
      out[`${schema}.${name}`] = r.rows[0];
    }
    return out;
  } finally {
    await c.end();
  }
}

beforeAll(async () => {
  dir = makeTmpDir('keel-backup-');
  stack = await startStack({ worker: false, mailSink: false, env: { KEEL_AUTO_SCAN: '0' } });
  // Data in the tables that matter: a recording with its sample chunks (bytea), audit entries,
  // sessions, a network change.
  const engineer = createClient(stack.baseUrl);
  expect((await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
  const up = await uploadCsv(stack, engineer, 'backed-up.csv', csvText(tarrowSeries(4000, 30, 1_767_312_000)));
  expect(up.status, JSON.stringify(up.body)).toBe(201);
  expect((await engineer.post('/api/network/areas', { code: 'backup-check', name: 'Backup check' })).status).toBe(201);
}, 120_000);

afterAll(async () => {
  await stack?.stop();
  if (restoredDb) {
    const a = new pg.Client({ connectionString: adminUrl() });
    await a.connect();
    await a.query(`DROP DATABASE IF EXISTS "${restoredDb}" WITH (FORCE)`).finally(() => a.end());
  }
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

describe('pg_dump / pg_restore (custom format)', () => {
  it('restores into a fresh database with the same rows in every table, and Keel runs on it', async () => {
    const src = new URL(stack.databaseUrl);
    const conn = ['-h', src.hostname, '-p', src.port, '-U', 'postgres'];
    const dump = path.join(dir, 'keel.dump');
    run(pgTool('pg_dump'), [...conn, '-d', stack.databaseName, '-Fc', '-f', dump]);
    expect(fs.statSync(dump).size).toBeGreaterThan(10_000);
    expect(fs.readFileSync(dump).subarray(0, 5).toString('latin1')).toBe('PGDMP'); // the custom-format signature

    restoredDb = `${stack.databaseName}_restored`;
    const a = new pg.Client({ connectionString: adminUrl() });
    await a.connect();
    await a.query(`CREATE DATABASE "${restoredDb}" TEMPLATE template0`).finally(() => a.end());
    run(pgTool('pg_restore'), [...conn, '-d', restoredDb, '--no-owner', '--exit-on-error', dump]);

    const restoredUrl = stack.databaseUrl.replace(/\/[^/]*$/, `/${restoredDb}`);
    const before = await tableStates(stack.databaseUrl);
    const after = await tableStates(restoredUrl);
    expect(Object.keys(before)).toEqual(expect.arrayContaining(['public.recordings', 'public.sample_chunks', 'public.audit_log', 'public.session', 'public.people']));
    expect(Object.keys(before).some((k) => k.startsWith('drizzle.'))).toBe(true); // the migration journal comes along
    expect(after).toEqual(before);
    expect(before['public.sample_chunks'].rows).toBeGreaterThan(0);

    // A server on the restored database: the same people, sessions and recording.
    const original = stack.env.DATABASE_URL;
    stack.env.DATABASE_URL = restoredUrl;
    try {
      await stack.restartServer();
      const engineer = createClient(stack.baseUrl);
      expect((await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
      const list = await engineer.get('/api/recordings');
      const rec = list.body.recordings.find((r: { fileName: string }) => r.fileName === 'backed-up.csv');
      expect(rec).toMatchObject({ status: 'ready', sampleCount: 4000 });
      const samples = await engineer.get(`/api/recordings/${rec.id}/samples?channel=moorgate.freq&maxPoints=4000`);
      expect(samples.status).toBe(200);
      expect(samples.body.max).toEqual(tarrowSeries(4000, 30, 1_767_312_000).channels['moorgate.freq']);
    } finally {
      stack.env.DATABASE_URL = original;
      await stack.restartServer();
    }
  });
});
