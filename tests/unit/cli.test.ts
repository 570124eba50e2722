// End-to-end tests of the command line (scripts/keel.ts): spawned as a process on small files.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseComtrade, parseCsvRecord, writeComtrade, writeCsv } from '../../modal/formats';
import { buildTarrowModel, simulateRingdown, trackMode } from '../../modal/simulator';

const ROOT = path.resolve(__dirname, '../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const dir = mkdtempSync(path.join(os.tmpdir(), 'keel-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function keel(...args: string[]) {
  const r = spawnSync(TSX, [path.join(ROOT, 'scripts/keel.ts'), ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

// A noise-free line-trip ring-down with a known answer: the post-trip model's modes.
const model = buildTarrowModel(2200);
const sim = simulateRingdown(model, { event: 'line-trip', seconds: 25, preEventSeconds: 2, loadNoise: 0, pmuNoise: { angleDeg: 0, freqHz: 0, flowMw: 0 } });
const trueNs = trackMode(sim.postEventModel, 'north-south')!;
writeFileSync(path.join(dir, 'trip.csv'), writeCsv(sim.record, { decimals: 9 }));
const ct = writeComtrade(sim.record, { fileType: 'BINARY', triggerTime: sim.eventTime });
writeFileSync(path.join(dir, 'trip.cfg'), ct.cfg);
writeFileSync(path.join(dir, 'trip.dat'), ct.dat);

describe('keel fit', () => {
  it('fits the noise-free ring-down in a CSV file and finds the true north–south mode (simulator eigenvalues)', () => {
    const r = keel('fit', 'trip.csv', '--from', '2.1', '--to', '22', '--channels', 'moorgate.mw,saltreach-bay.angle,greyscar.freq');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.method).toBe('matrix-pencil');
    expect(out.angleReference).toBe('tarrow-central.angle');
    expect(out.order).toBeGreaterThanOrEqual(2);
    const ns = out.modes.find((m: { frequencyHz: number }) => Math.abs(m.frequencyHz - trueNs.frequencyHz) < 0.01);
    expect(ns).toBeDefined();
    expect(Math.abs(ns.frequencyHz - trueNs.frequencyHz)).toBeLessThan(0.002);
    expect(Math.abs(ns.dampingPercent - trueNs.dampingPercent)).toBeLessThan(0.2);
    expect(ns.channels.map((c: { channel: string }) => c.channel)).toEqual(['moorgate.mw', 'saltreach-bay.angle', 'greyscar.freq']);
    expect(out.snrDb).toBeGreaterThan(30);
  });

  it('reads a binary COMTRADE pair (.cfg with its .dat) and gives the same mode with Prony', () => {
    const r = keel('fit', 'trip.cfg', '--from', '2.1', '--to', '22', '--method', 'prony', '--channels', 'moorgate.mw');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.method).toBe('prony');
    const ns = out.modes.find((m: { frequencyHz: number }) => Math.abs(m.frequencyHz - trueNs.frequencyHz) < 0.01);
    expect(Math.abs(ns.dampingPercent - trueNs.dampingPercent)).toBeLessThan(0.3);
  });
});

describe('keel simulate and scan', () => {
  it('simulate writes an ambient CSV and prints the true modes; scan estimates windows on it', () => {
    const r = keel('simulate', '--kind', 'ambient', '--minutes', '6', '--transfer-mw', '1500', '--seed', '4', '--out', 'amb.csv');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.files).toEqual(['amb.csv']);
    expect(out.samples).toBe(6 * 60 * 30);
    const ns = out.trueModes.find((m: { track: string }) => m.track === 'north-south');
    expect(ns.frequencyHz).toBeCloseTo(trackMode(buildTarrowModel(1500), 'north-south')!.frequencyHz, 10);
    expect(ns.shape.length).toBe(10);
    const rec = parseCsvRecord(readFileSync(path.join(dir, 'amb.csv'), 'utf8'));
    expect(rec.rate).toBe(30);
    expect(rec.channels.length).toBe(22);

    const s = keel('scan', 'amb.csv', '--window', '300', '--step', '60');
    expect(s.stderr).toBe('');
    expect(s.code).toBe(0);
    const scan = JSON.parse(s.stdout);
    expect(scan.windows.length).toBe(2);
    expect(scan.windows[1].start - scan.windows[0].start).toBeCloseTo(60, 6);
    expect(scan.windows[0].end - scan.windows[0].start).toBeCloseTo(300, 6);
    const m = scan.windows[0].modes.find((x: { frequencyHz: number }) => Math.abs(x.frequencyHz - ns.frequencyHz) < 0.03);
    expect(m).toBeDefined();
    expect(m.dampingCi.length).toBe(2);
    expect(typeof m.forced).toBe('boolean');
    expect(m.shape[0]).toHaveProperty('angleDeg');
  });

  it('simulate writes a COMTRADE ring-down pair whose trigger is the event', () => {
    const r = keel('simulate', '--kind', 'ringdown', '--seconds', '10', '--pre-event', '2', '--transfer-mw', '1000', '--seed', '2', '--format', 'comtrade', '--out', 'rd.cfg');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.files).toEqual(['rd.cfg', 'rd.dat']);
    expect(out.eventTime).toBe(out.startTime + 2);
    const rec = parseComtrade(readFileSync(path.join(dir, 'rd.cfg'), 'utf8'), new Uint8Array(readFileSync(path.join(dir, 'rd.dat'))));
    expect(rec.channels[0].values.length).toBe(12 * 30);
    expect(readFileSync(path.join(dir, 'rd.cfg'), 'utf8').split('\r\n')).toContain('01/01/2025,00:00:02.000000');
  });
});

describe('fixtures', () => {
  it('the command in a fixture\'s truth file regenerates the fixture byte for byte', () => {
    const truth = JSON.parse(readFileSync(path.join(ROOT, 'fixtures/ringdown-generator-loss-1200mw.truth.json'), 'utf8'));
    const argv = (truth.command as string).replace('npm run --silent keel -- ', '').split(' ');
    const outAt = argv.indexOf('--out');
    argv[outAt + 1] = 'regen.cfg';
    const r = keel(...argv);
    expect(r.code).toBe(0);
    expect(readFileSync(path.join(dir, 'regen.dat'))).toEqual(readFileSync(path.join(ROOT, 'fixtures/ringdown-generator-loss-1200mw.dat')));
    expect(JSON.parse(r.stdout).trueModes).toEqual(truth.trueModes);
  });
});

describe('keel: bad input and bad command lines', () => {
  it('refuses a CSV with a duplicate timestamp: exit 1, the line and reason on stderr, nothing on stdout', () => {
    writeFileSync(path.join(dir, 'dup.csv'), 'time,moorgate.mw\n1735689600,1\n1735689600.1,2\n1735689600.1,3\n1735689600.3,4\n');
    const r = keel('fit', 'dup.csv', '--from', '0', '--to', '0.3');
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toBe("keel: dup.csv: line 4: time 1735689600.1 is not after the previous row's 1735689600.1 (duplicate timestamp)\n");
  });

  it('refuses a .cfg without its .dat, an unknown file type and a missing file', () => {
    writeFileSync(path.join(dir, 'lonely.cfg'), ct.cfg);
    expect(keel('scan', 'lonely.cfg').stderr).toBe('keel: lonely.cfg: the COMTRADE data file lonely.dat is not beside it\n');
    writeFileSync(path.join(dir, 'data.xlsx'), 'x');
    const r = keel('scan', 'data.xlsx');
    expect(r.code).toBe(1);
    expect(r.stderr).toBe('keel: data.xlsx: unknown file type ".xlsx"; expected .csv, .cfg (COMTRADE, with its .dat) or .cff\n');
    expect(keel('fit', 'nothing.csv', '--from', '0', '--to', '1').stderr).toBe('keel: nothing.csv: no such file\n');
  });

  it('passes an estimator refusal through with exit 1', () => {
    const r = keel('fit', 'trip.csv', '--from', '2', '--to', '22', '--channels', 'moorgate.volts');
    expect(r.code).toBe(1);
    expect(r.stderr.startsWith('keel: Unknown channel "moorgate.volts"')).toBe(true);
  });

  it('usage errors exit 2 and name the problem', () => {
    const a = keel('fit', 'trip.csv', '--to', '5');
    expect(a.code).toBe(2);
    expect(a.stderr.split('\n')[0]).toBe('keel: --from is required');
    expect(keel('fit', 'trip.csv', '--from', 'soon', '--to', '5').stderr.split('\n')[0]).toBe('keel: --from must be a number, got "soon"');
    expect(keel('fit', 'trip.csv', '--from', '5', '--to', '1').stderr.split('\n')[0]).toBe('keel: --to (1) must be after --from (5)');
    expect(keel('fit', 'trip.csv', '--from', '0', '--to', '5', '--method', 'guess').stderr.split('\n')[0]).toBe(
      'keel: --method must be one of matrix-pencil, prony, got "guess"',
    );
    expect(keel('simulate', '--kind', 'ambient', '--transfer-mw', '900', '--seed', '1').stderr.split('\n')[0]).toBe('keel: --out is required');
    expect(keel('simulate', '--kind', 'ambient', '--transfer-mw', '9000', '--seed', '1', '--minutes', '1', '--out', 'x.csv').stderr).toBe(
      'keel: transferMw 9000 is outside the modelled Highmoor–Saltreach range 0–3200 MW\n',
    );
    expect(existsSync(path.join(dir, 'x.csv'))).toBe(false);
    const u = keel('transmogrify');
    expect(u.code).toBe(2);
    expect(u.stderr.split('\n')[0]).toBe('keel: unknown command "transmogrify"; commands are fit, scan, simulate');
    expect(keel('scan', 'amb.csv', '--windw', '300').stderr.startsWith("keel: Unknown option '--windw'")).toBe(true);
  });
});
