// `npm run bench:api`: latency and throughput of the screens' main reads at production size.
//
//   1. the bootstrap of `npm test` (throwaway PostgreSQL 15 + Redis on loopback, migrate, seed),
//   2. a YEAR of scan results (scripts/bench/fill-year.ts: ~1.6 M estimates with shapes, windows with
//      corridor transfer, the alerts the rule raises), then ANALYZE,
//   3. the server (`server/main.ts`) with NODE_ENV=production, as deployed: it skips the check of
//      every answer against its response schema (server/config.ts). Measured one request at a time
//      on the filled year, that check made no difference beyond the noise (Watch, Trends and the
//      7-day study alike), so development mode gives the same figures. As deployed, Watch, Trends
//      and the study go through the server's read cache (server/read-cache.ts: entries ≤ 1 s old),
//      so clients asking for the same answer share one computation a second; --read-cache-ms 0
//      shows the cost without it. Signed in as the demo planner (cookie session, as the browser);
//   4. for each endpoint, autocannon with 50 connections on loopback for --duration seconds (after
//      a short warm-up): p50 / p95 / p99 latency from every response, requests/s, errors
//      (non-2xx, socket errors, timeouts), PASS/FAIL against the targets.
//
// Endpoints: Watch (GET /api/watch); Trends (GET /api/tracks/north-south/estimates) over a year,
// a month and a day with maxPoints=700 (the wide Trends screen); the transfer study
// (GET /api/studies/transfer) over the screen's default 7 days and over 90 days (the answer's
// points are a bounded sample, so its size stays flat); and GET /api/auth/me, the floor:
// what any signed-in request costs (session read and touch, person lookup).
// Targets: p95 ≤ 50 ms for Watch, ≤ 150 ms for a year of Trends, no errors anywhere.
//
//   npm run bench:api -- [--days 365] [--duration 10] [--connections 50] [--keep]
//                        [--database-url URL --redis-url URL]   (an already filled database;
//                         --pg-data DIR: its cluster's data folder, for PostgreSQL's CPU figure)
//                        [--server-root DIR]                    (run another checkout's server)
//                        [--node-env production|development]
//                        [--read-cache-ms N]                    (the server's READ_CACHE_MS; 0: every
//                         request reads the database, to see what the cache saves)
import os from 'node:os';
import { parseArgs } from 'node:util';
import autocannon from 'autocannon';
import pg from 'pg';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../../db/seed';
import { freePort, loadLine, pad, cpuBetween, postgresCpuSnapshot, procCpuMs, procStatusMb, repoRoot, scriptPid, signIn, stackEnv, startBenchServices, startServer } from './bench-stack';
import { fillEstimates } from './fill-year';

const { values: args } = parseArgs({
  options: {
    days: { type: 'string' },
    duration: { type: 'string' },
    connections: { type: 'string' },
    keep: { type: 'boolean' },
    'database-url': { type: 'string' },
    'redis-url': { type: 'string' },
    'server-root': { type: 'string' },
    'node-env': { type: 'string' },
    'read-cache-ms': { type: 'string' },
    'pg-data': { type: 'string' },
  },
});

interface Row {
  name: string;
  path: string;
  targetP95: number | null;
  p50: number;
  p95: number;
  p99: number;
  rps: number;
  errors: number;
  requests: number;
  kb: number;
  /** CPU time per request of the server process and of PostgreSQL (all its backends), ms. */
  serverCpu: number | null;
  dbCpu: number | null;
}

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil(p * sorted.length) - 1)];
}

async function cannon(url: string, cookie: string, connections: number, duration: number): Promise<Omit<Row, 'name' | 'path' | 'targetP95' | 'serverCpu' | 'dbCpu'>> {
  const times: number[] = [];
  let bytes = 0;
  const inst = autocannon({ url, connections, duration, headers: { cookie, accept: 'application/json' }, timeout: 30 });
  // every answer's latency (autocannon's own summary has no 95th percentile)
  inst.on('response', (_client: unknown, _status: number, resBytes: number, ms: number) => {
    times.push(ms);
    bytes += resBytes;
  });
  const r = await inst;
  times.sort((a, b) => a - b);
  return {
    p50: percentile(times, 0.5),
    p95: percentile(times, 0.95),
    p99: percentile(times, 0.99),
    rps: r.requests.total / duration,
    errors: r.non2xx + r.errors + r.timeouts,
    requests: r.requests.total,
    kb: times.length ? bytes / times.length / 1024 : 0,
  };
}

async function main() {
  const days = args.days ? Number(args.days) : 365;
  const duration = args.duration ? Number(args.duration) : 10;
  const connections = args.connections ? Number(args.connections) : 50;
  const nodeEnv = args['node-env'] ?? 'production';
  const serverRoot = args['server-root'] ?? repoRoot;
  console.log(`bench:api — ${loadLine()}`);
  const svc = await startBenchServices({ databaseUrl: args['database-url'], redisUrl: args['redis-url'], keep: args.keep });
  let server: Awaited<ReturnType<typeof startServer>> | null = null;
  const pool = new pg.Pool({ connectionString: svc.databaseUrl, max: 4 });
  try {
    if (!args['database-url']) {
      console.log(`filling ${days} days of scan results…`);
      const s = await fillEstimates(pool, { days, log: (l) => console.log(l) });
      console.log(
        `filled: ${s.windows.toLocaleString('en')} windows, ${s.estimates.toLocaleString('en')} estimates, ${s.shapes.toLocaleString('en')} shape rows, ${s.alerts} alerts in ${s.seconds.toFixed(0)} s`,
      );
      await pool.query('analyze');
    }
    const counts = (
      await pool.query<{ e: number; a: number }>('select (select count(*) from mode_estimates)::int as e, (select count(*) from alerts)::int as a')
    ).rows[0];
    const latest = (await pool.query<{ at: Date }>(`select max(at) as at from mode_estimates e join mode_tracks t on t.id = e.track_id where t.code = 'north-south'`)).rows[0].at;
    if (!latest) throw new Error('the database holds no north–south estimates');

    const port = await freePort();
    const readCacheMs = args['read-cache-ms'] ?? '1000';
    const env = stackEnv({
      databaseUrl: svc.databaseUrl,
      redisUrl: svc.redisUrl,
      port,
      prefix: `keel-bench-${process.pid}`,
      nodeEnv,
      extra: { READ_CACHE_MS: readCacheMs },
    });
    server = await startServer(env, serverRoot);
    const base = `http://127.0.0.1:${port}`;
    const planner = DEMO_PEOPLE.find((p) => p.role === 'planner')!;
    const { cookie } = await signIn(base, planner.email, DEMO_PASSWORD);

    const to = latest.toISOString();
    const ago = (d: number) => new Date(latest.getTime() - d * 86_400_000).toISOString();
    // the transfer screen asks for the 7 days up to the next whole hour
    const studyTo = new Date(Math.ceil(latest.getTime() / 3_600_000) * 3_600_000);
    const study = (d: number) =>
      `/api/studies/transfer?track=north-south&from=${encodeURIComponent(new Date(studyTo.getTime() - d * 86_400_000).toISOString())}&to=${encodeURIComponent(studyTo.toISOString())}`;
    const trends = (d: number) => `/api/tracks/north-south/estimates?from=${encodeURIComponent(ago(d))}&to=${encodeURIComponent(to)}&maxPoints=700`;
    const endpoints: Pick<Row, 'name' | 'path' | 'targetP95'>[] = [
      { name: 'floor: GET /api/auth/me', path: '/api/auth/me', targetP95: null },
      { name: 'Watch', path: '/api/watch', targetP95: 50 },
      { name: 'Trends, a year', path: trends(365), targetP95: 150 },
      { name: 'Trends, a month', path: trends(30), targetP95: null },
      { name: 'Trends, a day', path: trends(1), targetP95: null },
      { name: 'Transfer study, 7 days', path: study(7), targetP95: null },
      // ~130 000 windows: the answer still carries at most STUDY_MAX_POINTS of them (the size effect)
      { name: 'Transfer study, 90 days', path: study(90), targetP95: null },
    ];
    for (const e of endpoints) {
      const r = await fetch(base + e.path, { headers: { cookie } });
      if (r.status !== 200) throw new Error(`${e.name}: GET ${e.path} answered ${r.status}: ${(await r.text()).slice(0, 300)}`);
      await r.arrayBuffer();
    }
    const serverPid = scriptPid(server.child.pid!);
    console.log(
      `\n${counts.e.toLocaleString('en')} mode estimates, ${counts.a} alerts; server NODE_ENV=${nodeEnv} READ_CACHE_MS=${readCacheMs} from ${serverRoot}; ${connections} connections × ${duration} s per endpoint`,
    );
    const rows: Row[] = [];
    for (const e of endpoints) {
      await cannon(base + e.path, cookie, Math.min(10, connections), 2); // warm-up
      const load = os.loadavg()[0];
      const pgData = svc.pgData ?? args['pg-data'] ?? null;
      const cpu0 = { server: procCpuMs(serverPid), db: pgData ? postgresCpuSnapshot(pgData) : null };
      const r = await cannon(base + e.path, cookie, connections, duration);
      const cpu1 = { server: procCpuMs(serverPid), db: pgData ? postgresCpuSnapshot(pgData) : null };
      const per = (ms: number | null) => (ms === null || r.requests === 0 ? null : ms / r.requests);
      const serverMs = cpu0.server === null || cpu1.server === null ? null : cpu1.server - cpu0.server;
      rows.push({ ...e, ...r, serverCpu: per(serverMs), dbCpu: per(cpuBetween(cpu0.db, cpu1.db)) });
      console.log(`  ${e.name}: done (load ${load.toFixed(1)})`);
    }
    const line = (cells: string[]) => console.log(cells.join('  '));
    console.log('');
    line([
      pad('endpoint', 26),
      pad('p50 ms', 8, true),
      pad('p95 ms', 8, true),
      pad('p99 ms', 8, true),
      pad('req/s', 7, true),
      pad('requests', 8, true),
      pad('errors', 6, true),
      pad('kB/resp', 7, true),
      pad('CPU ms/req: server', 18, true),
      pad('db', 5, true),
      pad('target p95', 10, true),
      'result',
    ]);
    let allPass = true;
    for (const r of rows) {
      const pass = r.errors === 0 && (r.targetP95 === null || r.p95 <= r.targetP95);
      if (r.targetP95 !== null || r.errors > 0) allPass &&= pass;
      line([
        pad(r.name, 26),
        pad(r.p50.toFixed(1), 8, true),
        pad(r.p95.toFixed(1), 8, true),
        pad(r.p99.toFixed(1), 8, true),
        pad(r.rps.toFixed(0), 7, true),
        pad(r.requests, 8, true),
        pad(r.errors, 6, true),
        pad(r.kb.toFixed(1), 7, true),
        pad(r.serverCpu === null ? '—' : r.serverCpu.toFixed(2), 18, true),
        pad(r.dbCpu === null ? '—' : r.dbCpu.toFixed(2), 5, true),
        pad(r.targetP95 === null ? '—' : `≤ ${r.targetP95}`, 10, true),
        r.targetP95 === null ? (r.errors === 0 ? 'ok (no target)' : 'FAIL (errors)') : pass ? 'PASS' : 'FAIL',
      ]);
    }
    console.log(
      `\nCPU ms/req: CPU time the server process and PostgreSQL spent per request during the run (independent of how busy the machine was; ` +
        `Node serves on one core, so 1000 / server CPU ms is its request-rate ceiling per core)`,
    );
    console.log(`server peak memory (VmHWM) ${procStatusMb(serverPid, 'VmHWM')?.toFixed(0) ?? '?'} MB; ${loadLine()}`);
    console.log(allPass ? 'bench:api: every target met' : 'bench:api: some target missed (see the table; the machine load is above)');
  } finally {
    await server?.stop();
    await pool.end();
    await svc.stop();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
