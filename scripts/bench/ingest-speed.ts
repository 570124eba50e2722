// Ingest benchmark: one hour of 30 frames/s data for 20 Tarrow channels (~30 MB of CSV), by
// default. Prints figures; asserts nothing (targets: ≤ 10 s and ≤ 300 MB peak memory for the
// stored ingest).
//   npx tsx scripts/bench/ingest-speed.ts [--minutes 60] [--channels 20] [--rate 30]
// Phases, each in a child process of its own so that its peak RSS is its own:
//   parse — reading and checking the file, chunks kept in memory and dropped (no database);
//   store — the whole ingest into PostgreSQL in one transaction (prepareUpload + storeUpload),
//           as the upload route and the ingest job do it. Uses DATABASE_URL (a migrated and seeded
//           database) if set; otherwise starts a throwaway PostgreSQL (scripts/lib/services.mjs).
import { execFileSync } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { TARROW_CHANNELS } from '../../fixtures/tarrow-network';

const args = process.argv.slice(2);
const opt = (name: string, def: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : def;
};

async function fileOf(p: string) {
  const buf = fs.readFileSync(p);
  return [{ originalName: path.basename(p), path: p, size: buf.length, sha256: crypto.createHash('sha256').update(buf).digest('hex') }];
}

async function phaseParse(file: string): Promise<Record<string, number>> {
  const { openUpload } = await import('../../server/ingest/open');
  const { planColumns, runIngest } = await import('../../server/ingest/pipeline');
  const files = await fileOf(file);
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const { source } = await openUpload(files);
  const channels = TARROW_CHANNELS.map((c, i) => ({ id: i + 1, name: c.name }));
  const plan = planColumns(source, channels);
  let bytes = 0;
  const s = await runIngest(source, plan, { writeChunks: async (cs) => void cs.forEach((c) => (bytes += c.values.byteLength)) });
  const sec = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  const size = fs.statSync(file).size;
  return { seconds: sec, cpuSeconds: (cpu.user + cpu.system) / 1e6, mbPerS: size / 1e6 / sec, rowsPerS: s.rows / sec, rows: s.rows, sampleBytes: bytes };
}

async function phaseStore(file: string): Promise<Record<string, number>> {
  const { createDb, createPool } = await import('../../db/client');
  const { createRecording, deleteRecording } = await import('../../db/queries/recordings');
  const { prepareUpload, storeUpload } = await import('../../server/ingest/store');
  const pool = createPool(process.env.DATABASE_URL!, { max: 2 });
  const db = createDb(pool);
  const files = await fileOf(file);
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const prepared = await prepareUpload(db, { files });
  let id = 0;
  const s = await db.transaction(async (tx) => {
    const rec = await createRecording(tx, {
      fileName: prepared.fileName,
      checksum: prepared.checksum,
      format: prepared.format,
      sizeBytes: prepared.sizeBytes,
      uploadedBy: null,
      status: 'ingesting',
    });
    id = rec.id;
    return storeUpload(tx, { recordingId: rec.id, prepared });
  });
  const sec = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  const size = fs.statSync(file).size;
  await deleteRecording(db, { id });
  await pool.end();
  return { seconds: sec, cpuSeconds: (cpu.user + cpu.system) / 1e6, mbPerS: size / 1e6 / sec, rowsPerS: s.rows / sec, chunks: s.chunks };
}

async function child(phase: string, file: string) {
  // Wall and CPU seconds of the ingest itself (this process; the database server's work is not
  // in the CPU figure). On a busy machine the wall time says more about the neighbours.
  const out = phase === 'parse' ? await phaseParse(file) : await phaseStore(file);
  out.peakRssMb = process.resourceUsage().maxRSS / 1024;
  process.stdout.write(`${JSON.stringify(out)}\n`);
}

/** Writes the benchmark CSV (also used by the HTTP ingest benchmark, ./ingest-http.ts); returns the row count. */
export function writeCsv(file: string, minutes: number, nChannels: number, rate: number): number {
  const names = TARROW_CHANNELS.slice(0, nChannels).map((c) => c.name);
  if (names.length < nChannels) throw new Error(`the Tarrow network has only ${names.length} channels`);
  const fd = fs.openSync(file, 'w');
  fs.writeSync(fd, ['time', ...names].join(',') + '\n');
  const frames = minutes * 60 * rate;
  const start = 1_735_689_600;
  let seed = 12345;
  const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648) - 0.5;
  const walk = names.map(() => 0);
  let buf = '';
  for (let i = 0; i < frames; i++) {
    const t = i / rate;
    let line = (start + t).toFixed(6);
    names.forEach((n, c) => {
      walk[c] += 0.01 * rnd();
      const osc = Math.sin(2 * Math.PI * 0.31 * t + c) * 0.5;
      // Angles spread over ±170°, frequencies near 60 Hz, MW near 1200: 7 decimals, as PMU
      // exports often carry, make the hour about 30 MB.
      const v = n.endsWith('.freq') ? 60 + 0.001 * (osc + walk[c]) : n.endsWith('.mw') ? 1200 + 40 * (osc + walk[c]) : -170 + 17 * c + osc + walk[c];
      line += ',' + v.toFixed(7);
    });
    buf += line + '\n';
    if (buf.length > 1 << 20) {
      fs.writeSync(fd, buf);
      buf = '';
    }
  }
  fs.writeSync(fd, buf);
  fs.closeSync(fd);
  return frames;
}

async function main() {
  if (args[0] === '--phase') return child(args[1], args[2]);
  const minutes = opt('minutes', 60);
  const nChannels = opt('channels', 20);
  const rate = opt('rate', 30);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-bench-ingest-'));
  const file = path.join(dir, 'bench.csv');
  const frames = writeCsv(file, minutes, nChannels, rate);
  const size = fs.statSync(file).size;
  console.log(`file: ${minutes} min × ${rate} frames/s × ${nChannels} channels = ${frames} rows, ${(size / 1e6).toFixed(1)} MB`);

  const tsx = path.join(__dirname, '..', '..', 'node_modules', '.bin', 'tsx');
  const run = (phase: string, env: NodeJS.ProcessEnv) =>
    JSON.parse(execFileSync(tsx, [__filename, '--phase', phase, file], { env, encoding: 'utf8' }).trim().split('\n').pop()!) as Record<string, number>;
  const show = (name: string, r: Record<string, number>) =>
    console.log(
      `${name}: ${r.seconds.toFixed(2)} s wall (${r.cpuSeconds.toFixed(2)} s CPU), ${r.mbPerS.toFixed(1)} MB/s, ${Math.round(r.rowsPerS).toLocaleString('en')} rows/s, peak RSS ${r.peakRssMb.toFixed(0)} MB`,
    );
  console.log(`load average ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} CPUs`);
  show('parse (no database)', run('parse', process.env));

  let pg: { stop(): void } | null = null;
  let databaseUrl = process.env.DATABASE_URL;
  try {
    if (!databaseUrl) {
      const services = await import('../lib/services.mjs' as string);
      const port = await services.freePort();
      const started = services.startPostgres({ dir: path.join(dir, 'pg'), port, fast: false });
      pg = { stop: () => services.stopPostgres(started) };
      services.ensureDatabase(port, 'keel_bench');
      databaseUrl = started.url('keel_bench') as string;
      services.runTsx('db/migrate.ts', { DATABASE_URL: databaseUrl });
      services.runTsx('scripts/seed.ts', { DATABASE_URL: databaseUrl });
    }
    show('store (PostgreSQL, one transaction)', run('store', { ...process.env, DATABASE_URL: databaseUrl }));
  } finally {
    pg?.stop();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (require.main === module) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
