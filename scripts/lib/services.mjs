// Bootstrap helpers shared by `npm start` and `npm test`. Plain Node (no npm packages), because
// they run before `npm ci` has installed anything.
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';

export const repoRoot = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..', '..');
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

export function log(msg) {
  process.stdout.write(`[keel] ${msg}\n`);
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', ...opts });
  if (r.status !== 0) {
    throw new Error(`${cmd} ${args.join(' ')} exited with ${r.status ?? r.signal}`);
  }
}

function isInstalled(pkg) {
  const r = spawnSync('dpkg-query', ['-W', '-f=${Status}', pkg], { encoding: 'utf8' });
  return r.status === 0 && r.stdout.includes('install ok installed');
}

/** Installs the Debian packages that are missing (apt-get as root, else through sudo -n). */
export function ensureDebianPackages(pkgs) {
  const missing = pkgs.filter((p) => !isInstalled(p));
  if (missing.length === 0) return;
  log(`installing Debian packages: ${missing.join(' ')}`);
  const prefix = isRoot ? [] : ['sudo', '-n'];
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  const apt = (args) => (prefix.length ? run(prefix[0], [...prefix.slice(1), 'apt-get', ...args], { env }) : run('apt-get', args, { env }));
  try {
    apt(['update', '-qq']);
    apt(['install', '-y', '-qq', '--no-install-recommends', ...missing]);
  } catch (err) {
    throw new Error(
      `could not install ${missing.join(', ')} (${err.message}). Install them with your package manager ` +
        `(e.g. sudo apt-get install ${missing.join(' ')}) and run the command again.`,
    );
  }
}

/** Runs `npm ci` when node_modules is missing or older than package-lock.json. */
export function ensureNpmPackages() {
  const lock = path.join(repoRoot, 'package-lock.json');
  const stamp = path.join(repoRoot, 'node_modules', '.package-lock.json');
  const fresh = fs.existsSync(stamp) && fs.statSync(stamp).mtimeMs >= fs.statSync(lock).mtimeMs - 1000;
  if (fresh) return;
  log('installing npm packages (npm ci)');
  run('npm', ['ci', '--no-audit', '--no-fund'], { cwd: repoRoot });
}

export function pgBinDir() {
  const base = '/usr/lib/postgresql';
  if (!fs.existsSync(base)) throw new Error('PostgreSQL binaries not found under /usr/lib/postgresql');
  const versions = fs.readdirSync(base).filter((v) => fs.existsSync(path.join(base, v, 'bin', 'pg_ctl')));
  if (versions.includes('15')) return path.join(base, '15', 'bin');
  if (versions.length === 0) throw new Error('no PostgreSQL server version installed under /usr/lib/postgresql');
  return path.join(base, versions.sort((a, b) => Number(b) - Number(a))[0], 'bin');
}

/** PostgreSQL refuses to run as root: as root, run its tools as the `postgres` user. */
function pgArgs(bin, args) {
  const exe = path.join(pgBinDir(), bin);
  return isRoot ? ['runuser', ['-u', 'postgres', '--', exe, ...args]] : [exe, args];
}

function makeOwnedDir(dir) {
  fs.mkdirSync(dir, { recursive: true });
  if (isRoot) {
    execFileSync('chown', ['-R', 'postgres:postgres', dir]);
    // every parent must be enterable by the postgres user
    let p = path.dirname(dir);
    while (p !== path.dirname(p)) {
      const st = fs.statSync(p);
      if ((st.mode & 0o001) === 0) fs.chmodSync(p, st.mode | 0o001);
      p = path.dirname(p);
    }
  }
}

export async function freePort() {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address();
      srv.close(() => resolve(port));
    });
  });
}

export async function portIsFree(port) {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once('error', () => resolve(false));
    srv.listen(port, '127.0.0.1', () => srv.close(() => resolve(true)));
  });
}

/**
 * Initialises (once) and starts a PostgreSQL cluster in `dir` listening on 127.0.0.1:`port` only.
 * `fast` turns off durability (fsync) — for throwaway test clusters only.
 */
export function startPostgres({ dir, port, fast = false }) {
  const data = path.join(dir, 'data');
  const sock = path.join(dir, 'sock');
  makeOwnedDir(dir);
  fs.mkdirSync(sock, { recursive: true });
  if (isRoot) execFileSync('chown', ['postgres:postgres', sock]);
  if (!fs.existsSync(path.join(data, 'PG_VERSION'))) {
    log(`initialising PostgreSQL in ${data}`);
    const [cmd, args] = pgArgs('initdb', ['-D', data, '-A', 'trust', '-U', 'postgres', '-E', 'UTF8', '--locale=C.UTF-8']);
    run(cmd, args, { stdio: ['ignore', 'ignore', 'inherit'] });
  }
  const opts = [`-p ${port}`, `-k ${sock}`, "-c listen_addresses=127.0.0.1", '-c max_connections=200'];
  if (fast) opts.push('-c fsync=off', '-c synchronous_commit=off', '-c full_page_writes=off');
  const [cmd, args] = pgArgs('pg_ctl', ['-D', data, '-o', opts.join(' '), '-l', path.join(dir, 'postgres.log'), '-w', '-t', '60', 'start']);
  run(cmd, args, { stdio: ['ignore', 'ignore', 'inherit'] });
  return { url: (db) => `postgres://postgres@127.0.0.1:${port}/${db}`, port, dir };
}

export function stopPostgres({ dir }) {
  const data = path.join(dir, 'data');
  if (!fs.existsSync(path.join(data, 'postmaster.pid'))) return;
  const [cmd, args] = pgArgs('pg_ctl', ['-D', data, '-m', 'fast', '-w', 'stop']);
  spawnSync(cmd, args, { stdio: 'ignore' });
}

export function psql(port, db, sql) {
  const r = spawnSync('psql', ['-h', '127.0.0.1', '-p', String(port), '-U', 'postgres', '-d', db, '-v', 'ON_ERROR_STOP=1', '-qAtc', sql], {
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(`psql failed: ${r.stderr}`);
  return r.stdout.trim();
}

export function ensureDatabase(port, name) {
  const exists = psql(port, 'postgres', `SELECT 1 FROM pg_database WHERE datname = '${name}'`);
  if (exists !== '1') psql(port, 'postgres', `CREATE DATABASE "${name}"`);
}

/** Starts redis-server as a child bound to 127.0.0.1 only; resolves when it answers PING. */
export async function startRedis({ dir, port, persist = true }) {
  fs.mkdirSync(dir, { recursive: true });
  const args = ['--port', String(port), '--bind', '127.0.0.1', '--dir', dir, '--protected-mode', 'yes', '--daemonize', 'no'];
  if (persist) args.push('--appendonly', 'yes', '--save', '60 1');
  else args.push('--save', '', '--appendonly', 'no');
  // BullMQ requires that Redis never evicts its keys.
  args.push('--maxmemory-policy', 'noeviction');
  const child = spawn('redis-server', args, { stdio: ['ignore', 'ignore', 'inherit'] });
  for (let i = 0; i < 100; i++) {
    const r = spawnSync('redis-cli', ['-h', '127.0.0.1', '-p', String(port), 'ping'], { encoding: 'utf8' });
    if (r.stdout && r.stdout.trim() === 'PONG') return { child, url: `redis://127.0.0.1:${port}`, port };
    if (child.exitCode !== null) throw new Error(`redis-server exited with ${child.exitCode}`);
    await new Promise((r2) => setTimeout(r2, 100));
  }
  throw new Error('redis-server did not answer PING within 10 s');
}

export async function stopChild(child, signal = 'SIGTERM', timeoutMs = 10_000) {
  if (!child || child.exitCode !== null || child.signalCode !== null) return;
  await new Promise((resolve) => {
    const t = setTimeout(() => {
      try {
        child.kill('SIGKILL');
      } catch {}
      resolve();
    }, timeoutMs);
    child.once('exit', () => {
      clearTimeout(t);
      resolve();
    });
    try {
      child.kill(signal);
    } catch {
      clearTimeout(t);
      resolve();
    }
  });
}

export function tsxBin() {
  return path.join(repoRoot, 'node_modules', '.bin', 'tsx');
}

export function runTsx(file, env, extraArgs = []) {
  run(tsxBin(), [file, ...extraArgs], { cwd: repoRoot, env: { ...process.env, ...env } });
}

export function spawnTsx(file, env, name) {
  const child = spawn(tsxBin(), [file], { cwd: repoRoot, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  const prefix = (line) => `[${name}] ${line}\n`;
  for (const stream of [child.stdout, child.stderr]) {
    let buf = '';
    stream.on('data', (d) => {
      buf += d.toString();
      let i;
      while ((i = buf.indexOf('\n')) >= 0) {
        process.stdout.write(prefix(buf.slice(0, i)));
        buf = buf.slice(i + 1);
      }
    });
  }
  return child;
}

export function tmpDir(prefix) {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), prefix));
  fs.chmodSync(d, 0o755);
  return d;
}
