// What the HTTP benchmarks share (bench:api, bench:ingest, bench:scaleout): the same bootstrap as
// `npm test` — a throwaway PostgreSQL 15 and Redis on free loopback ports with their data in a temp
// folder (scripts/lib/services.mjs), migrated and seeded — and real server / worker processes
// started from the command line as in production, a signed-in cookie, and the peak memory of a
// process tree read from /proc.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { descendants } from '../../tests/helpers/processes';

export const repoRoot = path.resolve(__dirname, '..', '..');

interface Services {
  freePort(): Promise<number>;
  startPostgres(o: { dir: string; port: number; fast?: boolean }): { url(db: string): string; port: number; dir: string };
  stopPostgres(pg: { dir: string }): void;
  startRedis(o: { dir: string; port: number; persist?: boolean }): Promise<{ child: ChildProcess; url: string; port: number }>;
  stopChild(child: ChildProcess): Promise<void>;
  ensureDatabase(port: number, name: string): void;
  runTsx(file: string, env: Record<string, string>): void;
  tmpDir(prefix: string): string;
}

async function services(): Promise<Services> {
  return (await import(path.join(repoRoot, 'scripts', 'lib', 'services.mjs'))) as Services;
}

export interface BenchServices {
  databaseUrl: string;
  redisUrl: string;
  pgPort: number;
  work: string;
  /** The PostgreSQL data folder when this run started the cluster (null for a given DATABASE_URL). */
  pgData: string | null;
  stop(): Promise<void>;
}

/**
 * A throwaway PostgreSQL + Redis (durability off unless asked: a benchmark cluster, like the test one), with one
 * migrated and seeded database `keel_bench`. Or, with `databaseUrl` and `redisUrl` given, those.
 */
export async function startBenchServices(
  opts: { databaseUrl?: string; redisUrl?: string; keep?: boolean; log?: (l: string) => void; /** fsync on (default false: a throwaway cluster) */ durable?: boolean } = {},
): Promise<BenchServices> {
  const s = await services();
  const log = opts.log ?? ((l: string) => console.log(l));
  const work = s.tmpDir('keel-bench-');
  let pg: { dir: string; url(db: string): string; port: number } | null = null;
  let redis: { child: ChildProcess; url: string } | null = null;
  let databaseUrl = opts.databaseUrl;
  let redisUrl = opts.redisUrl;
  let pgPort = 0;
  try {
    if (!databaseUrl) {
      pgPort = await s.freePort();
      pg = s.startPostgres({ dir: path.join(work, 'pg'), port: pgPort, fast: !opts.durable });
      s.ensureDatabase(pgPort, 'keel_bench');
      databaseUrl = pg.url('keel_bench');
      s.runTsx('db/migrate.ts', { DATABASE_URL: databaseUrl });
      s.runTsx('scripts/seed.ts', { DATABASE_URL: databaseUrl });
      log(`PostgreSQL on 127.0.0.1:${pgPort}${opts.durable ? '' : ' (fsync off)'}, data in ${work}`);
    } else {
      pgPort = Number(new URL(databaseUrl).port);
    }
    if (!redisUrl) {
      redis = await s.startRedis({ dir: path.join(work, 'redis'), port: await s.freePort(), persist: false });
      redisUrl = redis.url;
    }
  } catch (err) {
    if (redis) await s.stopChild(redis.child);
    if (pg) s.stopPostgres(pg);
    throw err;
  }
  return {
    databaseUrl,
    redisUrl,
    pgPort,
    work,
    pgData: pg ? path.join(pg.dir, 'data') : null,
    async stop() {
      if (redis) await s.stopChild(redis.child);
      if (pg) s.stopPostgres(pg);
      if (!opts.keep) fs.rmSync(work, { recursive: true, force: true });
      else log(`kept ${work}`);
    },
  };
}

export async function freePort(): Promise<number> {
  return (await services()).freePort();
}

export interface Proc {
  child: ChildProcess;
  logs: string[];
  stop(signal?: NodeJS.Signals): Promise<void>;
}

/**
 * `tsx <file>` from `root` (default: this checkout) with the environment added, in a session of its
 * own (setsid), as a service manager would start it. That matters on Linux with autogroup
 * scheduling (kernel.sched_autogroup_enabled = 1, the common default): the CPU is shared fairly
 * between sessions first, so processes started in the benchmark's own session would split ONE
 * session's share between them — two workers would get no more CPU than one on a busy machine.
 */
export function spawnProc(file: string, env: Record<string, string>, name: string, root = repoRoot, echo = false): Proc {
  const child = spawn(path.join(root, 'node_modules', '.bin', 'tsx'), [file], {
    cwd: root,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  });
  const logs: string[] = [];
  const keep = (d: Buffer) => {
    for (const line of d.toString().split('\n')) {
      if (!line.trim()) continue;
      logs.push(line);
      if (echo) console.log(`[${name}] ${line}`);
    }
    if (logs.length > 500) logs.splice(0, logs.length - 500);
  };
  child.stdout?.on('data', keep);
  child.stderr?.on('data', keep);
  return {
    child,
    logs,
    stop(signal: NodeJS.Signals = 'SIGTERM') {
      return new Promise<void>((resolve) => {
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        const t = setTimeout(() => child.kill('SIGKILL'), 15_000);
        child.once('exit', () => {
          clearTimeout(t);
          resolve();
        });
        child.kill(signal);
      });
    },
  };
}

export async function waitFor<T>(check: () => Promise<T | undefined | false | null>, what: string, timeoutMs = 60_000, everyMs = 200): Promise<T> {
  const t0 = Date.now();
  let last: unknown = null;
  for (;;) {
    try {
      const v = await check();
      if (v) return v;
    } catch (err) {
      last = err;
    }
    if (Date.now() - t0 > timeoutMs) throw new Error(`${what}: not within ${timeoutMs / 1000} s${last ? ` (${(last as Error).message})` : ''}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

/** Environment of a Keel process of the benchmark stack. */
export function stackEnv(o: { databaseUrl: string; redisUrl: string; port: number; prefix: string; nodeEnv?: string; extra?: Record<string, string> }): Record<string, string> {
  return {
    DATABASE_URL: o.databaseUrl,
    REDIS_URL: o.redisUrl,
    HOST: '127.0.0.1',
    PORT: String(o.port),
    APP_URL: `http://127.0.0.1:${o.port}`,
    QUEUE_PREFIX: o.prefix,
    SESSION_SECRET: `bench-${o.prefix}-a-long-random-enough-secret-for-production-mode`,
    NODE_ENV: o.nodeEnv ?? 'production',
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: '9', // nothing listens: the benchmarks send no e-mail
    ...(o.extra ?? {}),
  };
}

/** Starts `server/main.ts` and waits until it answers. */
export async function startServer(env: Record<string, string>, root = repoRoot): Promise<Proc> {
  const p = spawnProc('server/main.ts', env, 'server', root);
  const base = `http://127.0.0.1:${env.PORT}`;
  try {
    await waitFor(async () => (await fetch(`${base}/api/auth/csrf`)).status === 200, 'the server', 90_000);
  } catch (err) {
    await p.stop();
    throw new Error(`${(err as Error).message}\n${p.logs.slice(-20).join('\n')}`);
  }
  return p;
}

/** Signs in (CSRF token, then the local sign-in) and returns the Cookie header of the session. */
export async function signIn(baseUrl: string, email: string, password: string): Promise<{ cookie: string; csrf: string }> {
  const jar = new Map<string, string>();
  const remember = (h: Headers) => {
    for (const line of h.getSetCookie()) {
      const pair = line.split(';')[0];
      const i = pair.indexOf('=');
      jar.set(pair.slice(0, i).trim(), pair.slice(i + 1).trim());
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ');
  const c = await fetch(`${baseUrl}/api/auth/csrf`);
  remember(c.headers);
  const { csrfToken } = (await c.json()) as { csrfToken: string };
  const r = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie: cookie() },
    body: JSON.stringify({ email, password }),
  });
  remember(r.headers);
  if (r.status !== 200) throw new Error(`sign-in as ${email} answered ${r.status}: ${await r.text()}`);
  const body = (await r.json()) as { csrfToken: string };
  return { cookie: cookie(), csrf: body.csrfToken };
}

/** A /proc/<pid>/status field in MB (VmHWM: peak resident set; VmRSS: now), or null when gone. */
export function procStatusMb(pid: number, field: 'VmHWM' | 'VmRSS'): number | null {
  try {
    const m = new RegExp(`^${field}:\\s+(\\d+) kB`, 'm').exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) / 1024 : null;
  } catch {
    return null;
  }
}

/** The node process behind a `tsx` launcher: tsx runs the script in a child node process. */
export function scriptPid(launcherPid: number): number {
  const kids = descendants(launcherPid);
  // the script's node is the launcher's first-level child (sandboxed processors come below it)
  const direct = kids.filter((p) => {
    try {
      const stat = fs.readFileSync(`/proc/${p}/stat`, 'utf8');
      return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) === launcherPid;
    } catch {
      return false;
    }
  });
  return direct[0] ?? launcherPid;
}

/** CPU time (user + system) a process has used, ms; null when it is gone. */
export function procCpuMs(pid: number): number | null {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    // fields 14 and 15 of stat (utime, stime) are f[11], f[12] after the name; clock ticks of 10 ms (USER_HZ 100)
    return (Number(f[11]) + Number(f[12])) * 10;
  } catch {
    return null;
  }
}

/** CPU time so far (ms) of the given processes and everything below them, by pid. */
export function cpuSnapshot(roots: number[]): Map<number, number> {
  const out = new Map<number, number>();
  for (const root of roots) {
    for (const p of [root, ...descendants(root)]) {
      const ms = procCpuMs(p);
      if (ms !== null) out.set(p, ms);
    }
  }
  return out;
}

/** The same for every process of a PostgreSQL cluster we started (its postmaster and children). */
export function postgresCpuSnapshot(pgData: string): Map<number, number> | null {
  try {
    return cpuSnapshot([Number(fs.readFileSync(path.join(pgData, 'postmaster.pid'), 'utf8').split('\n')[0])]);
  } catch {
    return null;
  }
}

/**
 * CPU ms used between two snapshots: what the processes alive at the end used since the start (a
 * process that ended in between is lost; one that started counts whole).
 */
export function cpuBetween(a: Map<number, number> | null, b: Map<number, number> | null): number | null {
  if (!a || !b) return null;
  let ms = 0;
  for (const [pid, end] of b) ms += Math.max(0, end - (a.get(pid) ?? 0));
  return ms;
}

export function loadLine(): string {
  return `load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} CPUs`;
}

export function pad(s: string | number, n: number, right = false): string {
  const t = String(s);
  return right ? t.padStart(n) : t.padEnd(n);
}
