// Builds the web export (expo export --platform web, output "single") into dist/ when the app's
// sources changed since the last build, then prints the gzipped size of its JavaScript.
import { spawnSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { log, repoRoot } from './lib/services.mjs';

const SOURCES = ['app', 'components', 'hooks', 'shared', 'fixtures/tarrow-network.ts', 'modal', 'app.json', 'metro.config.js', 'scripts/metro', 'package-lock.json', 'tsconfig.json'];

function walk(p, out) {
  if (!fs.existsSync(p)) return;
  const st = fs.statSync(p);
  if (st.isDirectory()) {
    for (const e of fs.readdirSync(p).sort()) {
      if (e === 'node_modules' || e.endsWith('.test.ts') || e.endsWith('.test.tsx')) continue;
      walk(path.join(p, e), out);
    }
  } else out.push(p);
}

export function sourceHash() {
  const files = [];
  for (const s of SOURCES) walk(path.join(repoRoot, s), files);
  const h = crypto.createHash('sha256');
  for (const f of files) {
    h.update(path.relative(repoRoot, f));
    h.update(fs.readFileSync(f));
  }
  return h.digest('hex');
}

export function jsGzipBytes(dist) {
  const files = [];
  walk(dist, files);
  let total = 0;
  for (const f of files.filter((f) => f.endsWith('.js'))) total += zlib.gzipSync(fs.readFileSync(f), { level: 9 }).length;
  return total;
}

export function buildWeb({ dist = path.join(repoRoot, 'dist'), force = false } = {}) {
  const stampFile = path.join(dist, '.keel-source-hash');
  const hash = sourceHash();
  const stale = force || !fs.existsSync(stampFile) || fs.readFileSync(stampFile, 'utf8') !== hash;
  if (stale) {
    log('building the web export (expo export --platform web)');
    const r = spawnSync(path.join(repoRoot, 'node_modules', '.bin', 'expo'), ['export', '--platform', 'web', '--output-dir', dist, '--clear'], {
      cwd: repoRoot,
      stdio: ['ignore', 'inherit', 'inherit'],
      env: { ...process.env, EXPO_OFFLINE: '1', CI: '1', EXPO_NO_TELEMETRY: '1' },
    });
    if (r.status !== 0) throw new Error(`expo export failed (exit ${r.status})`);
    fs.writeFileSync(stampFile, hash);
  } else {
    log('web export is up to date');
  }
  const kb = jsGzipBytes(dist) / 1024;
  log(`web export JavaScript: ${kb.toFixed(1)} KB gzipped (budget 600 KB)`);
  return { dist, gzipKb: kb };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  try {
    buildWeb({ force: process.argv.includes('--force') });
  } catch (err) {
    console.error(err.message);
    process.exit(1);
  }
}
