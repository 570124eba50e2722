// Starts a whole Keel stack for one integration or browser test file: a fresh database copied
// from the migrated and seeded template that `npm test` prepared, a unique BullMQ prefix on the
// shared test Redis, and real processes (HTTP server, e-mail sink, worker) on free ports.
import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import net from 'node:net';
import path from 'node:path';
import pg from 'pg';

const repoRoot = path.resolve(__dirname, '..', '..');
const tsx = path.join(repoRoot, 'node_modules', '.bin', 'tsx');

export interface StackOptions {
  /** Start a worker process (default true). */
  worker?: boolean;
  /** Start the fake SMTP server (default true). */
  mailSink?: boolean;
  /** Extra environment for every process of the stack. */
  env?: Record<string, string>;
}

export interface Stack {
  baseUrl: string;
  databaseUrl: string;
  databaseName: string;
  redisUrl: string;
  queuePrefix: string;
  smtpPort: number;
  port: number;
  env: Record<string, string>;
  pool: pg.Pool;
  /** Lines printed by the stack's processes (for diagnosing failures). */
  logs: string[];
  restartServer(): Promise<void>;
  startWorker(): Promise<void>;
  stopWorker(signal?: NodeJS.Signals): Promise<void>;
  /** Starts one more worker process (scale-out tests); stopped by stop(). */
  addWorker(): Promise<ChildProcess>;
  stop(): Promise<void>;
}

function required(name: string): string {
  const v = process.env[name];
  if (!v) throw new Error(`${name} is not set: run integration tests through \`npm test\` (scripts/test.mjs)`);
  return v;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      srv.close(() => resolve(typeof addr === 'object' && addr ? addr.port : 0));
    });
  });
}

async function waitFor(check: () => Promise<boolean>, what: string, timeoutMs = 60_000): Promise<void> {
  const t0 = Date.now();
  while (Date.now() - t0 < timeoutMs) {
    try {
      if (await check()) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`${what} did not come up within ${timeoutMs / 1000} s`);
}

function portOpen(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect(port, '127.0.0.1');
    s.once('connect', () => {
      s.destroy();
      resolve(true);
    });
    s.once('error', () => resolve(false));
  });
}

function spawnProc(file: string, env: Record<string, string>, name: string, logs: string[]): ChildProcess {
  const child = spawn(tsx, [file], { cwd: repoRoot, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  const keep = (d: Buffer) => {
    for (const line of d.toString().split('\n')) if (line.trim()) logs.push(`[${name}] ${line}`);
    if (logs.length > 2000) logs.splice(0, logs.length - 2000);
  };
  child.stdout?.on('data', keep);
  child.stderr?.on('data', keep);
  return child;
}

async function stopProc(child: ChildProcess | null, signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  await new Promise<void>((resolve) => {
    const t = setTimeout(() => {
      child.kill('SIGKILL');
    }, 10_000);
    child.once('exit', () => {
      clearTimeout(t);
      resolve();
    });
    child.kill(signal);
  });
}

export async function startStack(opts: StackOptions = {}): Promise<Stack> {
  const adminUrl = required('KEEL_TEST_PG_ADMIN_URL');
  const template = required('KEEL_TEST_TEMPLATE_DB');
  const redisUrl = required('KEEL_TEST_REDIS_URL');
  const id = crypto.randomBytes(4).toString('hex');
  const databaseName = `keel_t_${id}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  try {
    // Copies of one template may not run while anyone is connected to it; retry briefly.
    for (let i = 0; ; i++) {
      try {
        await admin.query(`CREATE DATABASE "${databaseName}" TEMPLATE "${template}"`);
        break;
      } catch (err) {
        if (i > 20) throw err;
        await new Promise((r) => setTimeout(r, 250));
      }
    }
  } finally {
    await admin.end();
  }
  const databaseUrl = adminUrl.replace(/\/[^/]*$/, `/${databaseName}`);
  const port = await freePort();
  const smtpPort = await freePort();
  const queuePrefix = `keel-t-${id}`;
  const env: Record<string, string> = {
    DATABASE_URL: databaseUrl,
    REDIS_URL: redisUrl,
    HOST: '127.0.0.1',
    PORT: String(port),
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    APP_URL: `http://127.0.0.1:${port}`,
    QUEUE_PREFIX: queuePrefix,
    SESSION_SECRET: `test-${id}`,
    NODE_ENV: 'test',
    WEB_DIST: process.env.WEB_DIST ?? path.join(repoRoot, 'dist'),
    ...(opts.env ?? {}),
  };
  const logs: string[] = [];
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 4 });
  pool.on('error', () => {
    /* the database may be restarted by fault tests */
  });
  let server: ChildProcess | null = null;
  let mail: ChildProcess | null = null;
  let worker: ChildProcess | null = null;
  const extraWorkers: ChildProcess[] = [];
  const baseUrl = `http://127.0.0.1:${port}`;

  const startServer = async () => {
    server = spawnProc('server/main.ts', env, 'server', logs);
    await waitFor(async () => (await fetch(`${baseUrl}/api/auth/me`)).status > 0, 'the server');
  };
  const startWorker = async () => {
    worker = spawnProc('jobs/worker.ts', env, 'worker', logs);
    await waitFor(async () => {
      const r = await fetch(`${baseUrl}/api/health`);
      const body = (await r.json()) as { worker?: string };
      return body.worker === 'ok';
    }, 'the worker');
  };

  try {
    if (opts.mailSink !== false) {
      mail = spawnProc('server/mail-sink-main.ts', env, 'mail', logs);
      await waitFor(() => portOpen(smtpPort), 'the e-mail sink');
    }
    await startServer();
    if (opts.worker !== false) await startWorker();
  } catch (err) {
    await Promise.all([stopProc(server), stopProc(mail), stopProc(worker)]);
    await pool.end();
    throw new Error(`${(err as Error).message}\n${logs.slice(-40).join('\n')}`);
  }

  return {
    baseUrl,
    databaseUrl,
    databaseName,
    redisUrl,
    queuePrefix,
    smtpPort,
    port,
    env,
    pool,
    logs,
    async restartServer() {
      await stopProc(server);
      await startServer();
    },
    startWorker,
    async stopWorker(signal: NodeJS.Signals = 'SIGTERM') {
      await stopProc(worker, signal);
      worker = null;
    },
    async addWorker() {
      const w = spawnProc('jobs/worker.ts', env, `worker${extraWorkers.length + 2}`, logs);
      extraWorkers.push(w);
      return w;
    },
    async stop() {
      await Promise.all([stopProc(server), stopProc(mail), stopProc(worker), ...extraWorkers.map((w) => stopProc(w))]);
      await pool.end().catch(() => undefined);
      const a = new pg.Client({ connectionString: adminUrl });
      await a.connect();
      try {
        await a.query(`DROP DATABASE IF EXISTS "${databaseName}" WITH (FORCE)`);
      } finally {
        await a.end();
      }
    },
  };
}
