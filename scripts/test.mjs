// `npm test`: the same bootstrap as `npm start`, on throwaway ports and data folders, then every
// test (type check, unit, integration against real PostgreSQL and Redis, browser tests in Debian
// Chromium). Extra arguments go to vitest, e.g. `npm test -- tests/integration/auth.test.ts`.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import {
  ensureDatabase,
  ensureDebianPackages,
  ensureNpmPackages,
  freePort,
  log,
  repoRoot,
  runTsx,
  startPostgres,
  startRedis,
  stopChild,
  stopPostgres,
  tmpDir,
} from './lib/services.mjs';

const args = process.argv.slice(2);
const skipTypecheck = args.includes('--no-typecheck');
const vitestArgs = args.filter((a) => a !== '--no-typecheck');

let pg = null;
let redis = null;
let work = null;

async function cleanup() {
  if (redis) await stopChild(redis.child);
  if (pg) stopPostgres(pg);
  if (work && !process.env.KEEL_KEEP_TEST_DATA) fs.rmSync(work, { recursive: true, force: true });
}

async function main() {
  const t0 = Date.now();
  ensureDebianPackages(['postgresql', 'redis-server', 'chromium', 'python3-numpy', 'python3-scipy']);
  ensureNpmPackages();
  work = tmpDir('keel-test-');
  const pgPort = await freePort();
  pg = startPostgres({ dir: path.join(work, 'pg'), port: pgPort, fast: true });
  redis = await startRedis({ dir: path.join(work, 'redis'), port: await freePort(), persist: false });
  log(`test PostgreSQL on 127.0.0.1:${pgPort}, Redis on ${redis.url}, data in ${work}`);

  // A migrated and seeded template; every integration test file copies it into its own database.
  ensureDatabase(pgPort, 'keel_template');
  const templateEnv = { DATABASE_URL: pg.url('keel_template'), REDIS_URL: redis.url };
  runTsx('db/migrate.ts', templateEnv);
  runTsx('scripts/seed.ts', templateEnv);

  const { buildWeb } = await import('./build-web.mjs');
  buildWeb();

  const output = path.join(repoRoot, 'test-output');
  fs.rmSync(output, { recursive: true, force: true });
  fs.mkdirSync(output, { recursive: true });

  let typecheckOk = true;
  if (!skipTypecheck && vitestArgs.length === 0) {
    log('type check (tsc --noEmit)');
    const tc = spawnSync(path.join(repoRoot, 'node_modules', '.bin', 'tsc'), ['--noEmit', '-p', '.'], { cwd: repoRoot, stdio: 'inherit' });
    typecheckOk = tc.status === 0;
    log(typecheckOk ? 'type check passed' : 'type check FAILED');
  }

  const env = {
    ...process.env,
    KEEL_TEST_PG_ADMIN_URL: pg.url('postgres'),
    KEEL_TEST_PG_PORT: String(pgPort),
    KEEL_TEST_TEMPLATE_DB: 'keel_template',
    KEEL_TEST_REDIS_URL: redis.url,
    KEEL_TEST_OUTPUT: output,
    WEB_DIST: path.join(repoRoot, 'dist'),
    NODE_ENV: 'test',
  };
  const jsonOut = path.join(output, 'vitest.json');
  const vt = spawnSync(
    path.join(repoRoot, 'node_modules', '.bin', 'vitest'),
    ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${jsonOut}`, ...vitestArgs],
    { cwd: repoRoot, stdio: 'inherit', env },
  );
  let passed = 0;
  let failed = 0;
  let skipped = 0;
  if (fs.existsSync(jsonOut)) {
    const r = JSON.parse(fs.readFileSync(jsonOut, 'utf8'));
    passed = r.numPassedTests ?? 0;
    failed = r.numFailedTests ?? 0;
    skipped = (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
  }
  if (vt.status !== 0 && failed === 0) failed = 1; // a file that failed to load, or an error outside a test
  if (!typecheckOk) failed += 1;
  else if (!skipTypecheck && vitestArgs.length === 0) passed += 1;
  log(`finished in ${((Date.now() - t0) / 1000).toFixed(0)} s`);
  const ok = vt.status === 0 && typecheckOk && passed > 0;
  process.stdout.write(`\nTests: ${passed} passed, ${failed} failed, ${skipped} skipped\n`);
  return ok ? 0 : 1;
}

main()
  .then(async (code) => {
    await cleanup();
    process.exit(code);
  })
  .catch(async (err) => {
    console.error(`[keel] ${err.stack ?? err.message}`);
    await cleanup();
    process.exit(1);
  });
