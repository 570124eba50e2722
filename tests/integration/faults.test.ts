// Real outages of the backing services, not relays (health.test.ts cuts a TCP relay; this file
// stops and starts the services themselves). The file runs its own PostgreSQL and Redis on free
// ports (scripts/lib/services.mjs, as `npm test` does) so that stopping them disturbs no other
// test file; the Keel processes are the real server and worker (tests/helpers/stack.ts).
//  - Redis (append-only file on) stopped and started again in the middle of an ambient scan: the
//    scan completes, every window stored exactly once, none missing;
//  - PostgreSQL killed (immediate stop: crash recovery on the next start) and started again: while
//    it is down the API answers 503 UNAVAILABLE (health says database down) and the server does
//    not crash; afterwards it answers again by itself, sessions intact, and the worker runs a fit;
//  - the worker killed (SIGKILL, whole process tree) in the middle of an ingest job (a large
//    upload, stored in one transaction): the job is taken over once its lock lapses and the
//    recording is stored exactly once, its spool file removed. (worker-restart.test.ts does the
//    same to a scan.)
import { spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTarrowModel, simulateRingdown } from '../../modal/simulator';
import { createClient, type Client, type HttpResult } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { descendants } from '../helpers/processes';
import { startStack, type Stack } from '../helpers/stack';
import { ambientRecord, csvOf, TEST_CHANNELS, uploadCsv, uploadReady } from './analysis-helpers';

const repoRoot = path.resolve(__dirname, '..', '..');

interface Services {
  freePort(): Promise<number>;
  pgBinDir(): string;
  startPostgres(o: { dir: string; port: number; fast?: boolean }): { url(db: string): string; port: number; dir: string };
  stopPostgres(pg: { dir: string }): void;
  startRedis(o: { dir: string; port: number; persist?: boolean }): Promise<{ child: ChildProcess; url: string; port: number }>;
  stopChild(child: ChildProcess, signal?: NodeJS.Signals): Promise<void>;
  ensureDatabase(port: number, name: string): void;
  runTsx(file: string, env: Record<string, string>): void;
  tmpDir(prefix: string): string;
}

const MINUTES = 60;
const START = Date.UTC(2025, 6, 1, 0, 0, 0) / 1000;
const EXPECTED_WINDOWS = (MINUTES * 60 - 1200) / 60 + 1; // 20-minute windows every minute: 41

let s: Services;
let work = '';
let pg: { url(db: string): string; port: number; dir: string } | null = null;
let redis: { child: ChildProcess; url: string; port: number } | null = null;
let redisDir = '';
let spoolDir = '';
let firstWorker: ChildProcess;
let stack: Stack;
let engineer: Client;
const savedEnv: Record<string, string | undefined> = {};

/** PostgreSQL as if the machine lost it: no checkpoint, crash recovery at the next start. */
function killPostgres(): void {
  const ctl = path.join(s.pgBinDir(), 'pg_ctl');
  const args = ['-D', path.join(pg!.dir, 'data'), '-m', 'immediate', '-w', 'stop'];
  const asRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  const r = asRoot ? spawnSync('runuser', ['-u', 'postgres', '--', ctl, ...args], { encoding: 'utf8' }) : spawnSync(ctl, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`pg_ctl stop failed: ${r.stderr}`);
}

const health = async () => {
  const r = await fetch(`${stack.baseUrl}/api/health`);
  return { status: r.status, body: (await r.json()) as Record<string, unknown> };
};
const serverStarts = () => stack.logs.filter((l) => l.startsWith('[server]') && l.includes('listening on')).length;

beforeAll(async () => {
  s = (await import(path.join(repoRoot, 'scripts', 'lib', 'services.mjs'))) as Services;
  work = s.tmpDir('keel-faults-');
  const pgPort = await s.freePort();
  // Durable (fsync and synchronous commit on), unlike the shared test cluster: a crash must not
  // lose committed transactions such as a session stored just before it.
  pg = s.startPostgres({ dir: path.join(work, 'pg'), port: pgPort, fast: false });
  redisDir = path.join(work, 'redis');
  redis = await s.startRedis({ dir: redisDir, port: await s.freePort(), persist: true });
  s.ensureDatabase(pgPort, 'keel_faults_template');
  const env = { DATABASE_URL: pg.url('keel_faults_template'), REDIS_URL: redis.url };
  s.runTsx('db/migrate.ts', env);
  s.runTsx('scripts/seed.ts', env);
  // The stack helper reads where its services are from these variables; this test file's worker
  // process has its own environment, so pointing them at the private services touches no one else.
  for (const k of ['KEEL_TEST_PG_ADMIN_URL', 'KEEL_TEST_TEMPLATE_DB', 'KEEL_TEST_REDIS_URL']) savedEnv[k] = process.env[k];
  process.env.KEEL_TEST_PG_ADMIN_URL = pg.url('postgres');
  process.env.KEEL_TEST_TEMPLATE_DB = 'keel_faults_template';
  process.env.KEEL_TEST_REDIS_URL = redis.url;
  spoolDir = path.join(work, 'spool');
  // The worker is started with addWorker() so that this file holds its process (the ingest test kills it).
  stack = await startStack({ worker: false, mailSink: false, env: { KEEL_SPOOL_DIR: spoolDir, KEEL_AUTO_SCAN: '0' } });
  firstWorker = await stack.addWorker();
  await waitFor(async () => (await health()).body.worker === 'ok', 'the worker', 60_000);
  engineer = createClient(stack.baseUrl);
  expect((await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
}, 180_000);

afterAll(async () => {
  if (process.env.KEEL_DEBUG_LOGS) console.log(stack?.logs.join('\n'));
  await stack?.stop().catch(() => undefined);
  for (const [k, v] of Object.entries(savedEnv)) {
    if (v === undefined) delete process.env[k];
    else process.env[k] = v;
  }
  if (redis) await s.stopChild(redis.child);
  if (pg) s.stopPostgres(pg);
  if (work) fs.rmSync(work, { recursive: true, force: true });
});

async function windowStarts(analysisId: number): Promise<number[]> {
  const r = await stack.pool.query(
    'select extract(epoch from start_time)::float8 as s from scan_windows where analysis_id = $1 order by start_time',
    [analysisId],
  );
  return r.rows.map((x) => Number(x.s));
}

describe('Redis restarted during a scan', () => {
  it('the scan completes with every window stored once and none missing', async () => {
    const { record } = ambientRecord(1800, { minutes: MINUTES, seed: 31, start: START });
    const rec = await uploadReady(stack, engineer, 'tarrow-redis-restart.csv', csvOf(record), 180_000);
    const started = await engineer.post(`/api/recordings/${rec}/scans`, { settings: {} });
    expect(started.status, JSON.stringify(started.body)).toBe(201);
    const scan = started.body.analysis;
    await waitFor(async () => (await windowStarts(scan.id)).length >= 2, 'the first windows', 120_000);

    // SIGTERM: Redis writes its append-only file and exits, like a service restart.
    await s.stopChild(redis!.child);
    const atStop = (await windowStarts(scan.id)).length;
    const down = await health();
    expect(down.status).toBe(503);
    expect(down.body).toMatchObject({ database: 'ok', redis: 'down' });
    await new Promise((r) => setTimeout(r, 3000));
    redis = await s.startRedis({ dir: redisDir, port: redis!.port, persist: true });
    await waitFor(async () => (await health()).status === 200, 'the API to see Redis again', 30_000);

    const done = await waitFor(
      async () => {
        const a = (await engineer.get(`/api/analyses/${scan.id}`)).body.analysis;
        return a && (a.status === 'done' || a.status === 'failed') ? a : undefined;
      },
      'the scan to finish after the restart',
      180_000,
    );
    expect(done).toMatchObject({ status: 'done', error: null, progress: 1, windows: EXPECTED_WINDOWS });
    expect(await windowStarts(scan.id)).toEqual(Array.from({ length: EXPECTED_WINDOWS }, (_, k) => START + 60 * k));
    const empty = await stack.pool.query(
      'select count(*)::int as n from scan_windows w where w.analysis_id = $1 and not exists (select 1 from mode_estimates e where e.window_id = w.id)',
      [scan.id],
    );
    expect(empty.rows[0].n).toBe(0);
    // one scan of the recording, not a second one queued after the restart
    expect((await engineer.get(`/api/analyses?recording=${rec}&kind=scan`)).body.analyses).toHaveLength(1);
    await waitFor(async () => (await health()).body.worker === 'ok', 'the worker heartbeat', 30_000);
    expect(serverStarts()).toBe(1);
    console.log(`[faults] Redis stopped after ${atStop} of ${EXPECTED_WINDOWS} windows; the scan finished with all of them`);
  });
});

describe('PostgreSQL killed and started again', () => {
  it('answers 503 while it is down, recovers by itself with sessions intact, and the worker works again', async () => {
    const planner = createClient(stack.baseUrl);
    expect((await planner.signIn(ROLE_EMAIL.planner, DEMO_PASSWORD)).status).toBe(200);
    expect((await engineer.get('/api/network/areas')).status).toBe(200);

    killPostgres();
    const me = await engineer.get('/api/auth/me');
    expect(me.status).toBe(503);
    expect(me.body.error.code).toBe('UNAVAILABLE');
    const write = await engineer.post('/api/network/areas', { code: 'while-down', name: 'While down' });
    expect(write.status).toBe(503);
    expect(write.body.error.code).toBe('UNAVAILABLE');
    expect((await createClient(stack.baseUrl).get('/api/auth/csrf')).status).toBe(503);
    const h = await health();
    expect(h.status).toBe(503);
    expect(h.body).toMatchObject({ status: 'degraded', database: 'down', redis: 'ok' });

    pg = s.startPostgres({ dir: pg!.dir, port: pg!.port, fast: false });
    const back = await waitFor(async () => {
      const r = await engineer.get('/api/auth/me');
      return r.status === 200 ? r : null;
    }, 'the API to recover', 60_000);
    expect(back.body.person.email).toBe(ROLE_EMAIL.engineer);
    // Other requests may still meet a connection of the pool that died with the server (one more
    // 503), never a lost session (401) or a server error.
    const seen: number[] = [];
    const settled = async (call: () => Promise<HttpResult>) => {
      for (let i = 0; i < 20; i++) {
        const r = await call();
        seen.push(r.status);
        if (r.status !== 503) return r;
        await new Promise((res) => setTimeout(res, 250));
      }
      throw new Error(`still 503 after 5 s: ${seen.join(', ')}`);
    };
    expect((await settled(() => planner.get('/api/auth/me'))).body.person.email).toBe(ROLE_EMAIL.planner);
    expect((await settled(() => engineer.post('/api/network/areas', { code: 'after-restart', name: 'After restart' }))).status).toBe(201);
    expect(seen.filter((st) => st !== 200 && st !== 201 && st !== 503)).toEqual([]);
    await waitFor(async () => (await health()).status === 200, 'health 200 again', 10_000);
    const none = await stack.pool.query(`select count(*)::int as n from areas where code = 'while-down'`);
    expect(none.rows[0].n).toBe(0);

    // the worker's connections died with PostgreSQL too: a fit runs to the end on new ones
    const t0 = START + 7200;
    const sim = simulateRingdown(buildTarrowModel(2000), { event: 'line-trip', seed: 9, startTime: t0, seconds: 30, loadNoise: 0, channels: TEST_CHANNELS });
    const rec = await uploadReady(stack, engineer, 'tarrow-after-restart.csv', csvOf(sim.record));
    const iso = (t: number) => new Date(Math.round(t * 1000)).toISOString();
    const fit = await engineer.post(`/api/recordings/${rec}/fits`, { from: iso(sim.eventTime), to: iso(sim.eventTime + 20) });
    expect(fit.status, JSON.stringify(fit.body)).toBe(201);
    const done = await waitFor(
      async () => {
        const a = (await engineer.get(`/api/analyses/${fit.body.analysis.id}`)).body.analysis;
        return a && (a.status === 'done' || a.status === 'failed') ? a : undefined;
      },
      'the fit after the restart',
      120_000,
    );
    expect(done).toMatchObject({ status: 'done', error: null });
    expect(serverStarts()).toBe(1);
  });
});

describe('the worker killed in the middle of an ingest', () => {
  it('the job is taken over and the recording stored exactly once', async () => {
    const victim = firstWorker;
    const minutes = 60;
    const { record } = ambientRecord(2200, { minutes, seed: 47, start: START + 86_400 });
    const text = csvOf(record);
    const r = await uploadCsv(stack, engineer, 'tarrow-killed-ingest.csv', text);
    expect(r.status, JSON.stringify(r.body)).toBe(202);
    const analysisId = r.body.analysis.id as number;
    const recordingId = r.body.recording.id as number;
    await waitFor(
      async () => {
        const a = (await engineer.get(`/api/analyses/${analysisId}`)).body.analysis;
        return a.status === 'running' && a.progress > 0;
      },
      'the ingest to be under way',
      60_000,
    );
    for (const pid of [...descendants(victim.pid!), victim.pid!]) {
      try {
        process.kill(pid, 'SIGKILL');
      } catch {
        /* already gone */
      }
    }
    const killedAt = Date.now();
    const mid = (await engineer.get(`/api/recordings/${recordingId}`)).body.recording;
    expect(mid.status).toBe('ingesting'); // killed before its transaction committed
    expect((await stack.pool.query('select count(*)::int as n from sample_chunks where recording_id = $1', [recordingId])).rows[0].n).toBe(0);
    expect(fs.readdirSync(spoolDir)).toHaveLength(1); // kept for the retry

    await stack.addWorker();
    const done = await waitFor(
      async () => {
        const a = (await engineer.get(`/api/analyses/${analysisId}`)).body.analysis;
        return a.status === 'done' || a.status === 'failed' ? a : undefined;
      },
      'the ingest to be taken over and finished',
      150_000,
    );
    expect(done).toMatchObject({ status: 'done', error: null, progress: 1 });
    const frames = minutes * 60 * 30;
    const rec = (await engineer.get(`/api/recordings/${recordingId}`)).body.recording;
    expect(rec).toMatchObject({ status: 'ready', sampleCount: frames, channelCount: TEST_CHANNELS.length });
    const chunks = await stack.pool.query(
      'select count(*)::int as n, count(distinct (channel_id, chunk_index))::int as distinct_n from sample_chunks where recording_id = $1',
      [recordingId],
    );
    expect(chunks.rows[0]).toEqual({ n: TEST_CHANNELS.length * Math.ceil(frames / 3600), distinct_n: TEST_CHANNELS.length * Math.ceil(frames / 3600) });
    expect((await stack.pool.query(`select count(*)::int as n from recordings where file_name = 'tarrow-killed-ingest.csv'`)).rows[0].n).toBe(1);
    await waitFor(async () => fs.readdirSync(spoolDir).length === 0, 'the spool file to be removed', 10_000);
    console.log(`[faults] ingest killed mid-way; taken over and stored ${((Date.now() - killedAt) / 1000).toFixed(0)} s later (lock 30 s + stalled check)`);
  });
});
