// Accuracy benchmark of Keel's estimators on simulated Tarrow data (npm run bench:accuracy).
// The truth is the simulator's eigenvalues (modal/simulator); accuracy is reported as bias and
// spread over many noise realisations (Monte Carlo, CHECKS.md §5), with PASS/FAIL per target:
//
//   ring-down   20 s at 30 frames/s, 20 dB SNR, 200 realisations, the north–south mode at 3 %
//               (line trip at the transfer where the post-trip mode is 3 %), Prony and matrix
//               pencil: damping bias within ±0.2 points, spread ≤ 0.3 points, frequency spread
//               ≤ 0.005 Hz;
//   ambient     20-minute windows, ≥ 50 realisations, the north–south mode at the transfer where it
//               is 3 %: damping bias within ±0.5 points, spread ≤ 1.0, frequency bias within
//               0.01 Hz, 90 % confidence-interval coverage 80–97 %;
//   forced      a sustained forced oscillation added to ambient data is marked forced in ≥ 95 % of
//               windows; pure ambient windows carry a forced mark in ≤ 5 %;
//   shapes      estimated inter-area mode shapes against the true eigenvector: MAC ≥ 0.9 over all
//               angle channels and relative angles within 15° in ≥ 90 % of windows (fits). Angles
//               are judged on the channels whose true relative magnitude is at least
//               SHAPE_ANGLE_MIN_MAGNITUDE (0.05) of the largest: the angle of a channel that barely
//               moves (Millbrook in both inter-area modes, 0.1–0.2 % of the largest) is noise. The
//               table states the threshold; every channel's median error is printed, left-out ones
//               marked.
// Informational rows (no target in the issue; marked INFO, not counted): the east–west and
// Greyscar modes' frequency and damping bias and spread and 90 % interval coverage in the same
// windows, and the Greyscar shape.
// Also the simulator's speed: one day of 30 frames/s data for all channels.
//
//   npx tsx scripts/bench/accuracy.ts [--quick] [--ringdown N] [--ambient N]
import { parseArgs } from 'node:util';
import { TARROW_ANGLE_REFERENCE, TARROW_TRACKS } from '../../fixtures/tarrow-network';
import { estimateAmbientWindow } from '../../modal/ambient';
import { angleDifferenceDeg } from '../../modal/preprocess';
import { createRng } from '../../modal/random';
import { fitRingdown } from '../../modal/ringdown';
import {
  buildTarrowModel,
  modeOutputShape,
  simulateAmbient,
  simulateDayChunks,
  simulateRingdown,
  trackMode,
  transferAtDampingPercent,
  type TrueMode,
  type TarrowModel,
} from '../../modal/simulator';
import type { AmbientMode, RingdownMethod, SampledRecord, ShapeEntry } from '../../modal/types';

const { values: args } = parseArgs({
  options: { quick: { type: 'boolean' }, ringdown: { type: 'string' }, ambient: { type: 'string' } },
});
const N_RD = Number(args.ringdown ?? (args.quick ? 40 : 200));
const N_AMB = Number(args.ambient ?? (args.quick ? 12 : 60));

interface Row {
  target: string;
  measured: string;
  limit: string;
  pass: boolean;
  /** Informational: no target; printed as INFO and not counted. */
  info?: boolean;
}
/** Shape angles are judged on channels whose true magnitude is at least this share of the largest. */
const SHAPE_ANGLE_MIN_MAGNITUDE = 0.05;
const rows: Row[] = [];
const log = (s: string) => process.stdout.write(`${s}\n`);

function stats(x: number[]): { mean: number; sd: number; n: number } {
  const n = x.length;
  const mean = x.reduce((a, b) => a + b, 0) / Math.max(1, n);
  const sd = Math.sqrt(x.reduce((a, b) => a + (b - mean) ** 2, 0) / Math.max(1, n - 1));
  return { mean, sd, n };
}
const median = (x: number[]) => {
  const s = x.slice().sort((a, b) => a - b);
  return s.length ? (s.length % 2 ? s[(s.length - 1) / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2])) : NaN;
};
const f3 = (x: number) => x.toFixed(3);
const f2 = (x: number) => x.toFixed(2);

/** Angle channels relative to the reference (unwrapped differences), reference dropped. */
function relativeAngles(rec: SampledRecord): SampledRecord {
  const ref = rec.channels.find((c) => c.name === TARROW_ANGLE_REFERENCE)!.values;
  return {
    ...rec,
    channels: rec.channels
      .filter((c) => c.name !== TARROW_ANGLE_REFERENCE)
      .map((c) => (c.name.endsWith('.angle') ? { name: c.name, values: angleDifferenceDeg(c.values, ref) } : c)),
  };
}

/** MAC over all `names` and the largest relative-angle error (after the best common rotation) over
 * entries whose true magnitude is at least `minMagnitude` of the largest; `errors` holds every
 * channel's angle error, `judged` the channels the largest error is taken over. Both shapes as
 * ShapeEntry lists over `names`. */
function compareShapes(
  est: ShapeEntry[],
  truth: ShapeEntry[],
  names: string[],
  minMagnitude = SHAPE_ANGLE_MIN_MAGNITUDE,
): { mac: number; maxAngleErr: number; errors: Record<string, number>; judged: string[] } {
  const pick = (s: ShapeEntry[], n: string) => s.find((e) => e.channel === n);
  const e = names.map((n) => pick(est, n)!);
  const t = names.map((n) => pick(truth, n)!);
  const cx = (s: ShapeEntry) => ({ re: s.magnitude * Math.cos((s.angleDeg * Math.PI) / 180), im: s.magnitude * Math.sin((s.angleDeg * Math.PI) / 180) });
  const E = e.map(cx);
  const T = t.map(cx);
  let dr = 0;
  let di = 0;
  let ee = 0;
  let tt = 0;
  for (let k = 0; k < names.length; k++) {
    // Σ conj(t)·e
    dr += T[k].re * E[k].re + T[k].im * E[k].im;
    di += T[k].re * E[k].im - T[k].im * E[k].re;
    ee += E[k].re ** 2 + E[k].im ** 2;
    tt += T[k].re ** 2 + T[k].im ** 2;
  }
  const mac = (dr * dr + di * di) / (ee * tt);
  const rot = Math.atan2(di, dr); // estimate ≈ truth · e^{i rot}
  const tMax = Math.max(...t.map((s) => s.magnitude));
  let maxErr = 0;
  const errors: Record<string, number> = {};
  const judged: string[] = [];
  for (let k = 0; k < names.length; k++) {
    let d = e[k].angleDeg - t[k].angleDeg - (rot * 180) / Math.PI;
    d = ((((d + 180) % 360) + 360) % 360) - 180;
    errors[names[k]] = Math.abs(d);
    if (t[k].magnitude < minMagnitude * tMax) continue;
    judged.push(names[k]);
    maxErr = Math.max(maxErr, Math.abs(d));
  }
  return { mac, maxAngleErr: maxErr, errors, judged };
}

function nearest<T extends { frequencyHz: number }>(modes: T[], f: number, tol: number): T | undefined {
  let best: T | undefined;
  for (const m of modes) if (Math.abs(m.frequencyHz - f) <= tol && (!best || Math.abs(m.frequencyHz - f) < Math.abs(best.frequencyHz - f))) best = m;
  return best;
}

// ---------------------------------------------------------------------------------------------
// Simulator speed

function benchSimulator(): void {
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  let samples = 0;
  for (const chunk of simulateDayChunks({ hours: 24, rate: 30, seed: 1, chunkMinutes: 30 })) samples += chunk.record.channels[0].values.length * chunk.record.channels.length;
  const s = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  log(
    `simulator: one day at 30 frames/s, 22 channels (${(samples / 1e6).toFixed(1)} M samples, model rebuilt every 5 minutes): ` +
      `${s.toFixed(1)} s wall, ${((cpu.user + cpu.system) / 1e6).toFixed(1)} s CPU`,
  );
}

// ---------------------------------------------------------------------------------------------
// Ring-down Monte Carlo

function benchRingdown(): void {
  const p = transferAtDampingPercent('north-south', 3, { corridorCircuitsOut: 1 })!;
  const pre = 2;
  const seconds = 20;
  const quiet = { angleDeg: 0, freqHz: 0, flowMw: 0 };
  const sim = simulateRingdown(buildTarrowModel(p), { event: 'line-trip', seconds: seconds + 1, preEventSeconds: pre, loadNoise: 0, pmuNoise: quiet });
  const truth = trackMode(sim.postEventModel, 'north-south')!;
  const channels = ['moorgate.mw', 'saltreach-bay.angle', 'windlow.angle'];
  const clean = relativeAngles(sim.record);
  const rate = clean.rate;
  const i0 = sim.eventIndex;
  const n = seconds * rate;
  const cleanSeg = channels.map((name) => clean.channels.find((c) => c.name === name)!.values.subarray(i0, i0 + n));
  const snrDb = 20;
  const sigma = cleanSeg.map((x) => {
    const m = x.reduce((a, b) => a + b, 0) / x.length;
    const pw = x.reduce((a, b) => a + (b - m) ** 2, 0) / x.length;
    return Math.sqrt(pw / 10 ** (snrDb / 10));
  });
  const trueShape = modeOutputShape(sim.postEventModel, truth, channels, { angleReference: TARROW_ANGLE_REFERENCE });
  log('');
  log(
    `Ring-down: line trip at ${p.toFixed(0)} MW (post-trip north–south ${f3(truth.frequencyHz)} Hz, ${f2(truth.dampingPercent)} %), ` +
      `${seconds} s at ${rate} frames/s, ${snrDb} dB SNR per channel, ${N_RD} realisations, channels ${channels.join(', ')} (angles relative to ${TARROW_ANGLE_REFERENCE})`,
  );
  for (const method of ['prony', 'matrix-pencil'] as RingdownMethod[]) {
    const rng = createRng(method === 'prony' ? 9001 : 9002);
    const dz: number[] = [];
    const df: number[] = [];
    const shapeOk: boolean[] = [];
    let missed = 0;
    const t0 = performance.now();
    for (let r = 0; r < N_RD; r++) {
      const rec: SampledRecord = {
        startTime: 0,
        rate,
        channels: channels.map((name, k) => ({ name, values: Float64Array.from(cleanSeg[k], (v) => v + sigma[k] * rng.normal()) })),
      };
      const fit = fitRingdown(rec, { method });
      const m = nearest(fit.modes, truth.frequencyHz, 0.05);
      if (!m) {
        missed++;
        continue;
      }
      dz.push(m.dampingPercent - truth.dampingPercent);
      df.push(m.frequencyHz - truth.frequencyHz);
      const est: ShapeEntry[] = m.channels.map((c) => ({ channel: c.channel, magnitude: 1, angleDeg: c.phaseDeg }));
      // residue phases compare with the eigenvector's relative phases; magnitudes are in mixed units
      const unitTruth = trueShape.map((e) => ({ ...e, magnitude: 1 }));
      shapeOk.push(compareShapes(est, unitTruth, channels).maxAngleErr <= 15);
    }
    const ms = (performance.now() - t0) / N_RD;
    const z = stats(dz);
    const f = stats(df);
    log(
      `  ${method.padEnd(13)} damping bias ${z.mean >= 0 ? '+' : ''}${f3(z.mean)} points, spread ${f3(z.sd)}; frequency bias ${f.mean >= 0 ? '+' : ''}${f.mean.toFixed(4)} Hz, spread ${f.sd.toFixed(4)} Hz; ` +
        `found in ${z.n}/${N_RD}; phases within 15° in ${shapeOk.filter(Boolean).length}/${shapeOk.length}; ${ms.toFixed(1)} ms per fit`,
    );
    rows.push({ target: `ring-down ${method}: damping bias`, measured: `${f3(z.mean)} points`, limit: '±0.2', pass: Math.abs(z.mean) <= 0.2 && missed === 0 });
    rows.push({ target: `ring-down ${method}: damping spread`, measured: `${f3(z.sd)} points`, limit: '≤ 0.3', pass: z.sd <= 0.3 });
    rows.push({ target: `ring-down ${method}: frequency spread`, measured: `${f.sd.toFixed(4)} Hz`, limit: '≤ 0.005', pass: f.sd <= 0.005 });
    const okFrac = shapeOk.filter(Boolean).length / N_RD;
    rows.push({ target: `ring-down ${method}: shape phases within 15°`, measured: `${(100 * okFrac).toFixed(0)} % of fits`, limit: '≥ 90 %', pass: okFrac >= 0.9 });
  }
}

// ---------------------------------------------------------------------------------------------
// Ambient Monte Carlo (+ forced oscillation, + shapes)

interface ShapeScore {
  mac: number;
  err: number;
  errors: Record<string, number>;
  judged: string[];
  truthMagnitude: Record<string, number>;
}

interface ModeTally {
  dz: number[];
  df: number[];
  covered: number;
  found: number;
  shapes: ShapeScore[];
}

interface AmbientTally {
  ns: ModeTally;
  ew: ModeTally;
  gs: ModeTally;
  forcedMarks: number;
  ms: number[];
}

const newModeTally = (): ModeTally => ({ dz: [], df: [], covered: 0, found: 0, shapes: [] });

function angleNames(shape: ShapeEntry[]): string[] {
  return shape.filter((e) => e.channel.endsWith('.angle')).map((e) => e.channel);
}

/**
 * The estimate of a true mode in one window: the strongest natural estimate inside its track's
 * band (as the scan's track assignment takes it) within 0.05 Hz of the truth, or within the
 * mode's half-power half-width σ/2π when that is wider (0.14 Hz for the 10 % Greyscar mode).
 */
function trackEstimate(modes: AmbientMode[], truth: TrueMode): AmbientMode | undefined {
  const track = TARROW_TRACKS.find((t) => t.code === truth.track)!;
  const tol = Math.max(0.05, -truth.sigma / (2 * Math.PI));
  return modes
    .filter((m) => !m.forced && m.frequencyHz >= track.minHz && m.frequencyHz <= track.maxHz && Math.abs(m.frequencyHz - truth.frequencyHz) <= tol)
    .sort((a, b) => b.strength - a.strength)[0];
}

function scoreMode(model: TarrowModel, truth: TrueMode, m: AmbientMode, tally: ModeTally): void {
  tally.found++;
  tally.dz.push(m.dampingPercent - truth.dampingPercent);
  tally.df.push(m.frequencyHz - truth.frequencyHz);
  if (truth.dampingPercent >= m.dampingCi[0] && truth.dampingPercent <= m.dampingCi[1]) tally.covered++;
  const names = angleNames(m.shape);
  const tru = modeOutputShape(model, truth, names, { angleReference: TARROW_ANGLE_REFERENCE });
  const c = compareShapes(m.shape, tru, names);
  tally.shapes.push({ mac: c.mac, err: c.maxAngleErr, errors: c.errors, judged: c.judged, truthMagnitude: Object.fromEntries(tru.map((e) => [e.channel, e.magnitude])) });
}

function runAmbient(model: TarrowModel, truths: { ns: TrueMode; ew: TrueMode; gs: TrueMode }, seeds: number[], forced?: { frequencyHz: number; amplitude: number; site: string }) {
  const tally: AmbientTally = { ns: newModeTally(), ew: newModeTally(), gs: newModeTally(), forcedMarks: 0, ms: [] };
  let forcedHit = 0;
  for (const seed of seeds) {
    const rec = simulateAmbient(model, { minutes: 20, seed, forced });
    const t0 = performance.now();
    const w = estimateAmbientWindow(rec, { windowSeconds: 1200 });
    tally.ms.push(performance.now() - t0);
    if (forced) {
      if (w.modes.some((m) => m.forced && Math.abs(m.frequencyHz - forced.frequencyHz) <= 0.02)) forcedHit++;
      continue;
    }
    if (w.modes.some((m) => m.forced)) tally.forcedMarks++;
    for (const key of ['ns', 'ew', 'gs'] as const) {
      const m = trackEstimate(w.modes, truths[key]);
      if (m) scoreMode(model, truths[key], m, tally[key]);
    }
  }
  return { tally, forcedHit };
}

function modeRows(name: string, t: ModeTally, truth: TrueMode, info: boolean): void {
  const z = stats(t.dz);
  const f = stats(t.df);
  const cov = t.covered / Math.max(1, t.found);
  log(
    `  ${name}: found in ${t.found}/${N_AMB}; damping bias ${z.mean >= 0 ? '+' : ''}${f3(z.mean)} points, spread ${f3(z.sd)}; ` +
      `frequency bias ${f.mean >= 0 ? '+' : ''}${f.mean.toFixed(4)} Hz, spread ${f.sd.toFixed(4)} Hz; 90 % CI coverage ${(100 * cov).toFixed(0)} %` +
      (info ? ` (true ${f3(truth.frequencyHz)} Hz, ${f2(truth.dampingPercent)} %)` : ''),
  );
  const tag = info ? `ambient ${name} (informational)` : 'ambient';
  const row = (target: string, measured: string, limit: string, pass: boolean) =>
    rows.push(info ? { target: `${tag}: ${target}`, measured, limit: '—', pass: true, info: true } : { target: `${tag}: ${target}`, measured, limit, pass });
  if (!info) row('north–south found', `${t.found}/${N_AMB}`, 'all', t.found === N_AMB);
  else row('found', `${t.found}/${N_AMB}`, '', true);
  row('damping bias', `${f3(z.mean)} points`, '±0.5', Math.abs(z.mean) <= 0.5);
  row('damping spread', `${f3(z.sd)} points`, '≤ 1.0', z.sd <= 1.0);
  row('frequency bias', `${f.mean.toFixed(4)} Hz`, '±0.01', Math.abs(f.mean) <= 0.01);
  if (info) row('frequency spread', `${f.sd.toFixed(4)} Hz`, '', true);
  row('90 % CI coverage', `${(100 * cov).toFixed(0)} %`, '80–97 %', cov >= 0.8 && cov <= 0.97);
}

function shapeRows(name: string, list: ShapeScore[], info: boolean): void {
  const ok = list.filter((s) => s.mac >= 0.9 && s.err <= 15).length / N_AMB;
  log(
    `  ${name} shape (angle channels vs eigenvector): median MAC ${median(list.map((s) => s.mac)).toFixed(3)} (all channels), ` +
      `median largest angle error ${median(list.map((s) => s.err)).toFixed(1)}° (channels with true magnitude ≥ ${SHAPE_ANGLE_MIN_MAGNITUDE}), ` +
      `MAC ≥ 0.9 and angles within 15° in ${(100 * ok).toFixed(0)} % of windows`,
  );
  const chans = [...new Set(list.flatMap((s) => Object.keys(s.errors)))];
  const cell = (c: string) => {
    const errs = list.map((s) => s.errors[c]).filter((v) => v !== undefined);
    const mag = median(list.map((s) => s.truthMagnitude[c]).filter((v) => v !== undefined));
    const left = list.every((s) => !s.judged.includes(c));
    return `${c.replace('.angle', '')} ${median(errs).toFixed(1)}° (|true| ${mag.toFixed(2)}${left ? ', left out' : ''})`;
  };
  log(`    median angle error by channel: ${chans.map(cell).join(', ')}`);
  const target = `ambient${info ? ` ${name} (informational)` : ''}: ${name} shape MAC ≥ 0.9, angles ≤ 15° (|true| ≥ ${SHAPE_ANGLE_MIN_MAGNITUDE})`;
  rows.push(info ? { target, measured: `${(100 * ok).toFixed(0)} % of windows`, limit: '—', pass: true, info: true } : { target, measured: `${(100 * ok).toFixed(0)} % of windows`, limit: '≥ 90 %', pass: ok >= 0.9 });
}

function benchAmbient(): void {
  const p = transferAtDampingPercent('north-south', 3)!;
  const model = buildTarrowModel(p);
  const truths = { ns: trackMode(model, 'north-south')!, ew: trackMode(model, 'east-west')!, gs: trackMode(model, 'greyscar')! };
  const { ns, ew, gs } = truths;
  const seeds = Array.from({ length: N_AMB }, (_, i) => 5000 + i);
  log('');
  log(
    `Ambient: ${p.toFixed(0)} MW (north–south ${f3(ns.frequencyHz)} Hz, ${f2(ns.dampingPercent)} %; east–west ${f3(ew.frequencyHz)} Hz, ${f2(ew.dampingPercent)} %; ` +
      `Greyscar ${f3(gs.frequencyHz)} Hz, ${f2(gs.dampingPercent)} %), 20-minute windows, ${N_AMB} realisations, all 22 channels, default estimator options`,
  );
  const { tally } = runAmbient(model, truths, seeds);
  modeRows('north–south', tally.ns, ns, false);
  log(`  ${median(tally.ms).toFixed(0)} ms per window (median, one window from a 20-minute record, decimation included)`);
  modeRows('east–west', tally.ew, ew, true);
  modeRows('Greyscar', tally.gs, gs, true);
  const fa = tally.forcedMarks / N_AMB;
  rows.push({ target: 'forced: false marks on pure ambient', measured: `${(100 * fa).toFixed(0)} % of windows`, limit: '≤ 5 %', pass: fa <= 0.05 });
  shapeRows('north–south', tally.ns.shapes, false);
  shapeRows('east–west', tally.ew.shapes, false);
  shapeRows('Greyscar', tally.gs.shapes, true);

  const forced = { frequencyHz: 0.9, amplitude: 20, site: 'windlow' };
  const fSeeds = Array.from({ length: N_AMB }, (_, i) => 7000 + i);
  const { forcedHit } = runAmbient(model, truths, fSeeds, forced);
  const hit = forcedHit / N_AMB;
  log(`  forced oscillation ${forced.amplitude} MW at ${forced.frequencyHz} Hz injected at ${forced.site}: marked forced in ${forcedHit}/${N_AMB} windows`);
  rows.push({ target: 'forced: marked in forced windows', measured: `${(100 * hit).toFixed(0)} % of windows`, limit: '≥ 95 %', pass: hit >= 0.95 });
}

// ---------------------------------------------------------------------------------------------

function main(): void {
  log('Keel accuracy benchmark — simulated Tarrow data, truth = the simulator\'s eigenvalues');
  benchSimulator();
  benchRingdown();
  try {
    benchAmbient();
  } catch (e) {
    log(`  ambient part failed: ${(e as Error).message}`);
    rows.push({ target: 'ambient part', measured: 'error', limit: 'runs', pass: false });
  }
  log('');
  const w = Math.max(...rows.map((r) => r.target.length));
  const wm = Math.max(...rows.map((r) => r.measured.length));
  log(`${'target'.padEnd(w)}  ${'measured'.padEnd(wm)}  ${'limit'.padEnd(8)}  result`);
  for (const r of rows) log(`${r.target.padEnd(w)}  ${r.measured.padEnd(wm)}  ${r.limit.padEnd(8)}  ${r.info ? 'INFO' : r.pass ? 'PASS' : 'FAIL'}`);
  const judged = rows.filter((r) => !r.info);
  const failed = judged.filter((r) => !r.pass).length;
  log(`\n${judged.length - failed} PASS, ${failed} FAIL (${rows.length - judged.length} informational rows)`);
}

main();
