// `npm start`: installs what is missing, starts PostgreSQL and Redis on loopback with their data
// under .data/, migrates, seeds the Tarrow demo (idempotent), builds the web export when stale and
// serves the app and API with a worker and the local e-mail sink. Ctrl-C stops all of it.
import fs from 'node:fs';
import path from 'node:path';
import {
  ensureDatabase,
  ensureDebianPackages,
  ensureNpmPackages,
  log,
  portIsFree,
  repoRoot,
  runTsx,
  spawnTsx,
  startPostgres,
  startRedis,
  stopChild,
  stopPostgres,
} from './lib/services.mjs';

const PORT = Number(process.env.PORT ?? 8080);
const PG_PORT = Number(process.env.KEEL_PG_PORT ?? 54329);
const REDIS_PORT = Number(process.env.KEEL_REDIS_PORT ?? 63799);
const SMTP_PORT = Number(process.env.SMTP_PORT ?? 2525);
const dataDir = path.join(repoRoot, '.data');

const children = [];
let pg = null;
let redis = null;
let stopping = false;

async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  log('stopping…');
  for (const c of children.reverse()) await stopChild(c);
  if (redis) await stopChild(redis.child);
  if (pg) stopPostgres(pg);
  log('stopped');
  process.exit(code);
}
process.on('SIGINT', () => shutdown(0));
process.on('SIGTERM', () => shutdown(0));

async function main() {
  ensureDebianPackages(['postgresql', 'redis-server']);
  ensureNpmPackages();
  for (const [name, port] of [['web', PORT], ['PostgreSQL', PG_PORT], ['Redis', REDIS_PORT], ['e-mail sink', SMTP_PORT]]) {
    if (!(await portIsFree(port))) throw new Error(`port ${port} (${name}) is already in use on 127.0.0.1; stop what uses it or set another port`);
  }
  fs.mkdirSync(dataDir, { recursive: true });
  pg = startPostgres({ dir: path.join(dataDir, 'pg'), port: PG_PORT });
  log(`PostgreSQL on 127.0.0.1:${PG_PORT}`);
  redis = await startRedis({ dir: path.join(dataDir, 'redis'), port: REDIS_PORT });
  log(`Redis on 127.0.0.1:${REDIS_PORT}`);
  ensureDatabase(PG_PORT, 'keel');
  const env = {
    DATABASE_URL: process.env.DATABASE_URL ?? pg.url('keel'),
    REDIS_URL: process.env.REDIS_URL ?? redis.url,
    HOST: process.env.HOST ?? '127.0.0.1',
    PORT: String(PORT),
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(SMTP_PORT),
    APP_URL: process.env.APP_URL ?? `http://127.0.0.1:${PORT}`,
  };
  log('migrating');
  runTsx('db/migrate.ts', env);
  log('seeding (keeps existing data)');
  runTsx('scripts/seed.ts', env);
  const { buildWeb } = await import('./build-web.mjs');
  buildWeb();
  children.push(spawnTsx('server/mail-sink-main.ts', env, 'mail'));
  children.push(spawnTsx('jobs/worker.ts', env, 'worker'));
  children.push(spawnTsx('server/main.ts', env, 'server'));
  if (fs.existsSync(path.join(repoRoot, 'scripts', 'seed-demo.ts'))) {
    // Demo recordings and their scans go through the queue like any upload (first start only).
    children.push(spawnTsx('scripts/seed-demo.ts', env, 'demo'));
  }
  for (const c of children) {
    c.on('exit', (code, sig) => {
      if (!stopping && !(c.spawnfile && code === 0)) {
        log(`a process exited (${code ?? sig}); stopping`);
        shutdown(1);
      }
    });
  }
  log(`Keel is at ${env.APP_URL}  (Ctrl-C stops everything)`);
}

main().catch(async (err) => {
  console.error(`[keel] ${err.message}`);
  await shutdown(1);
});
