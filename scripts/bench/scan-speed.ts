// Speed benchmark of the ambient scan (npm run bench):
//
//   one simulated Tarrow day, 20 channels at 30 frames/s, 20-minute windows every minute
//   (1440 windows: the day plus the 19 minutes the last window reaches past midnight), scanned by
//     • Keel: createAmbientScanner fed 10-minute chunks (the way a worker streams stored samples),
//       in a fresh child process so its peak memory is its own;
//     • a straightforward numpy/scipy implementation of the same method and settings,
//       scripts/bench/scan_speed_ref.py, run with Debian's /usr/bin/python3;
//   printed side by side with the ratio, the real-time factor, Keel's peak memory (maxRSS) and
//   how closely the two agree on the north–south mode.
//
// Targets: Keel ≤ 1.5 × the numpy time, ≥ 1000 × real time (a day in ≤ 86.4 s) on 2 cores, peak
// memory ≤ 500 MB.
//
//   npx tsx scripts/bench/scan-speed.ts [--hours H] [--seed S] [--keep] [--no-python]
//
// The day is simulated once (modal/simulator, daily transfer profile, PMU noise) and written as
// one float64 file per channel under a temporary folder that both scanners read.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { createAmbientScanner } from '../../modal/ambient';
import { simulateDayChunks } from '../../modal/simulator';
import type { AmbientWindowResult } from '../../modal/types';

const { values: args } = parseArgs({
  options: {
    hours: { type: 'string' },
    seed: { type: 'string' },
    keep: { type: 'boolean' },
    'no-python': { type: 'boolean' },
    child: { type: 'string' },
  },
});

/** The 20 benchmark channels: every Tarrow angle and frequency (the two MW channels left out). */
const BENCH_CHANNELS = [
  'greyscar',
  'kestrel-falls',
  'moorgate',
  'tarrow-central',
  'millbrook',
  'saltreach-bay',
  'gullhaven',
  'eastfell-ridge',
  'cinderholt',
  'windlow',
].flatMap((s) => [`${s}.angle`, `${s}.freq`]);

interface Meta {
  rate: number;
  startTime: number;
  names: string[];
  samples: number;
}

/** Per window: the strongest natural mode in the north–south band, and counts. */
interface WindowSummary {
  start: number;
  skipped: boolean;
  modes: number;
  forced: number;
  ns: { f: number; d: number; dLo: number; dHi: number; fLo: number; fHi: number } | null;
}

function summarize(w: AmbientWindowResult): WindowSummary {
  const ns = w.modes.filter((m) => !m.forced && m.frequencyHz >= 0.2 && m.frequencyHz <= 0.45).sort((a, b) => b.strength - a.strength)[0];
  return {
    start: w.start,
    skipped: w.skipped,
    modes: w.modes.length,
    forced: w.modes.filter((m) => m.forced).length,
    ns: ns
      ? { f: ns.frequencyHz, d: ns.dampingPercent, dLo: ns.dampingCi[0], dHi: ns.dampingCi[1], fLo: ns.frequencyCi[0], fHi: ns.frequencyCi[1] }
      : null,
  };
}

// ---------------------------------------------------------------------------------------------
// Child: Keel's scan of the stored day

function runChild(dir: string): void {
  const meta: Meta = JSON.parse(fs.readFileSync(path.join(dir, 'meta.json'), 'utf8'));
  const chunk = meta.rate * 600;
  const fds = meta.names.map((_, k) => fs.openSync(path.join(dir, `ch${k}.f64`), 'r'));
  const bufs = meta.names.map(() => new Float64Array(chunk));
  const out: WindowSummary[] = [];
  const scanner = createAmbientScanner({ rate: meta.rate, startTime: meta.startTime, channelNames: meta.names }, undefined, (w) =>
    out.push(summarize(w)),
  );
  let scanMs = 0;
  let cpuUs = 0;
  for (let i = 0; i < meta.samples; i += chunk) {
    const n = Math.min(chunk, meta.samples - i);
    const views = bufs.map((b, k) => {
      const v = b.subarray(0, n);
      fs.readSync(fds[k], new Uint8Array(v.buffer, 0, n * 8), 0, n * 8, i * 8);
      return v;
    });
    const t0 = performance.now();
    const c0 = process.cpuUsage();
    scanner.push(views);
    const c = process.cpuUsage(c0);
    cpuUs += c.user + c.system;
    scanMs += performance.now() - t0;
  }
  const t0 = performance.now();
  const c0 = process.cpuUsage();
  scanner.finish();
  const c = process.cpuUsage(c0);
  cpuUs += c.user + c.system;
  scanMs += performance.now() - t0;
  fds.forEach((fd) => fs.closeSync(fd));
  const maxRssMb = process.resourceUsage().maxRSS / 1024;
  fs.writeFileSync(path.join(dir, 'keel.json'), JSON.stringify({ seconds: scanMs / 1000, cpuSeconds: cpuUs / 1e6, maxRssMb, windows: out }));
}

// ---------------------------------------------------------------------------------------------
// Parent

function simulate(dir: string, hours: number, seed: number): Meta {
  const fds = BENCH_CHANNELS.map((_, k) => fs.openSync(path.join(dir, `ch${k}.f64`), 'w'));
  let samples = 0;
  let startTime = 0;
  let rate = 30;
  for (const part of simulateDayChunks({ hours, seed, channels: BENCH_CHANNELS })) {
    if (samples === 0) {
      startTime = part.record.startTime;
      rate = part.record.rate;
    }
    part.record.channels.forEach((c, k) => fs.writeSync(fds[k], new Uint8Array(c.values.buffer, c.values.byteOffset, c.values.byteLength)));
    samples += part.record.channels[0].values.length;
  }
  fds.forEach((fd) => fs.closeSync(fd));
  const meta: Meta = { rate, startTime, names: BENCH_CHANNELS, samples };
  fs.writeFileSync(path.join(dir, 'meta.json'), JSON.stringify(meta));
  return meta;
}

function stats(x: number[]): { mean: number; median: number; max: number } {
  const s = x.slice().sort((a, b) => a - b);
  return {
    mean: x.reduce((a, b) => a + b, 0) / Math.max(1, x.length),
    median: s.length ? s[Math.floor(s.length / 2)] : NaN,
    max: s.length ? s[s.length - 1] : NaN,
  };
}

function main(): void {
  const hours = Number(args.hours ?? 24 + 19 / 60);
  const seed = Number(args.seed ?? 1);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-scan-bench-'));
  const log = (s: string) => process.stdout.write(`${s}\n`);
  try {
    log(`Simulating ${hours} h of the Tarrow grid, ${BENCH_CHANNELS.length} channels at 30 frames/s (seed ${seed}) …`);
    let t0 = performance.now();
    const meta = simulate(dir, hours, seed);
    log(`  ${meta.samples} samples per channel in ${((performance.now() - t0) / 1000).toFixed(1)} s → ${dir}`);

    log('Keel scan (child process, streaming 10-minute chunks) …');
    t0 = performance.now();
    const child = spawnSync(process.execPath, [...process.execArgv, __filename, '--child', dir], { stdio: 'inherit' });
    if (child.status !== 0) throw new Error(`Keel child failed with status ${child.status}`);
    const keel = JSON.parse(fs.readFileSync(path.join(dir, 'keel.json'), 'utf8'));

    let numpy: { seconds: number; cpuSeconds: number; windows: WindowSummary[] } | null = null;
    if (!args['no-python']) {
      log('numpy/scipy reference scan (scripts/bench/scan_speed_ref.py) …');
      const py = spawnSync('/usr/bin/python3', [path.join(__dirname, 'scan_speed_ref.py'), dir], { stdio: 'inherit' });
      if (py.status !== 0) throw new Error(`scan_speed_ref.py failed with status ${py.status}`);
      numpy = JSON.parse(fs.readFileSync(path.join(dir, 'numpy.json'), 'utf8'));
    }

    const days = meta.samples / meta.rate / 86400;
    const realTime = (meta.samples / meta.rate) / keel.seconds;
    log('');
    log(`Ambient scan of ${hours.toFixed(2)} simulated hours (20-minute windows every minute, 20 channels at 30 frames/s)`);
    log('                          Keel            numpy/scipy');
    log(`  windows                 ${String(keel.windows.length).padEnd(16)}${numpy ? numpy.windows.length : '—'}`);
    log(`  wall time, s            ${keel.seconds.toFixed(2).padEnd(16)}${numpy ? numpy.seconds.toFixed(2) : '—'}`);
    log(`  CPU time, s             ${keel.cpuSeconds.toFixed(2).padEnd(16)}${numpy ? numpy.cpuSeconds.toFixed(2) : '—'}`);
    if (numpy) log(`  Keel / numpy            ${(keel.seconds / numpy.seconds).toFixed(2)} (wall)   ${(keel.cpuSeconds / numpy.cpuSeconds).toFixed(2)} (CPU)   target ≤ 1.5`);
    log(`  × real time             ${realTime.toFixed(0)}   target ≥ 1000 (a day in ≤ 86.4 s)`);
    log(`  Keel peak memory        ${keel.maxRssMb.toFixed(0)} MB (maxRSS of the scanning process)   target ≤ 500 MB`);
    log(`  data scanned            ${days.toFixed(2)} day(s)`);
    const withNs = keel.windows.filter((w: WindowSummary) => w.ns).length;
    log(`  Keel windows with a north–south estimate: ${withNs}/${keel.windows.length}; with a forced mark: ${keel.windows.filter((w: WindowSummary) => w.forced > 0).length}`);
    if (numpy) {
      const dd: number[] = [];
      const df: number[] = [];
      keel.windows.forEach((w: WindowSummary, i: number) => {
        const p = numpy!.windows[i];
        if (w.ns && p && p.ns && Math.abs(w.start - p.start) < 1e-6) {
          dd.push(Math.abs(w.ns.d - p.ns.d));
          df.push(Math.abs(w.ns.f - p.ns.f));
        }
      });
      const sd = stats(dd);
      const sf = stats(df);
      log(
        `  Keel vs numpy, north–south (${dd.length} windows): |Δdamping| median ${sd.median.toExponential(1)} max ${sd.max.toExponential(1)} points; ` +
          `|Δf| median ${sf.median.toExponential(1)} max ${sf.max.toExponential(1)} Hz`,
      );
    }
  } finally {
    if (args.keep) log(`(data kept in ${dir})`);
    else fs.rmSync(dir, { recursive: true, force: true });
  }
}

if (args.child) runChild(args.child);
else main();
