import { describe, expect, it } from 'vitest';
import { TARROW_ANGLE_REFERENCE, TARROW_CHANNELS, TARROW_TRACKS } from '../../fixtures/tarrow-network';
import { buildTarrowModel, modeOutputShape, trackMode, transferAtDampingPercent, type TarrowModel } from './model';
import { runReference } from './reference.test-helper';

const TRANSFERS = [0, 500, 1500, 2500, 3000, 3200];
const models = TRANSFERS.map((p) => buildTarrowModel(p));
const tripped = buildTarrowModel(2500, { corridorCircuitsOut: 1 });
const ref = runReference([...models, tripped].map((m) => ({ op: 'eig', A: m.A })));

interface RefEig {
  re: number[];
  im: number[];
  vre: number[][];
  vim: number[][];
}

/** numpy's oscillatory eigenvalues (upper half-plane), sorted by frequency. */
function upper(r: RefEig): { re: number; im: number; k: number }[] {
  return r.re
    .map((re, k) => ({ re, im: r.im[k], k }))
    .filter((z) => z.im > 1e-6)
    .sort((a, b) => a.im - b.im);
}

describe('buildTarrowModel: true modes', () => {
  it('has the eigenvalues numpy.linalg.eig finds for the same state matrix (library)', () => {
    [...models, tripped].forEach((m, i) => {
      const np = upper(ref[i]);
      expect(m.trueModes.length).toBe(np.length);
      m.trueModes.forEach((mode, k) => {
        expect(Math.abs(mode.sigma - np[k].re)).toBeLessThan(1e-10);
        expect(Math.abs(mode.omega - np[k].im)).toBeLessThan(1e-10);
        const mag = Math.hypot(np[k].re, np[k].im);
        expect(mode.dampingRatio).toBeCloseTo(-np[k].re / mag, 12);
        expect(mode.frequencyHz).toBeCloseTo(np[k].im / (2 * Math.PI), 12);
      });
    });
  });

  it("gives each mode's bus-angle shape from numpy's eigenvector, relative to the reference angle (library)", () => {
    [...models, tripped].forEach((m, i) => {
      const np = upper(ref[i]);
      const angleOut = m.outputs.filter((o) => o.kind === 'angle');
      const refRow = angleOut.findIndex((o) => o.channel === TARROW_ANGLE_REFERENCE);
      m.trueModes.forEach((mode, k) => {
        if (mode.track === null || mode.track === 'greyscar') return; // the reference barely moves in a local mode
        const col = np[k].k;
        const v = angleOut.map((o) => {
          let re = 0;
          let im = 0;
          o.c.forEach((c, j) => {
            re += c * ref[i].vre[j][col];
            im += c * ref[i].vim[j][col];
          });
          return { re, im };
        });
        const maxMag = Math.max(...v.map((z) => Math.hypot(z.re, z.im)));
        const refPh = Math.atan2(v[refRow].im, v[refRow].re);
        mode.shape.forEach((e, q) => {
          expect(e.channel).toBe(angleOut[q].channel);
          expect(e.magnitude).toBeCloseTo(Math.hypot(v[q].re, v[q].im) / maxMag, 8);
          let d = e.angleDeg - ((Math.atan2(v[q].im, v[q].re) - refPh) * 180) / Math.PI;
          d = ((((d + 180) % 360) + 360) % 360) - 180;
          expect(Math.abs(d)).toBeLessThan(1e-6);
        });
      });
    });
  });

  it('gives the output shape c·v of any channel set from numpy\'s eigenvector, angles optionally relative to a reference channel (library)', () => {
    const i = 2; // 1500 MW
    const m = models[i];
    const np = upper(ref[i]);
    const names = ['moorgate.mw', 'moorgate.angle', 'windlow.angle', 'greyscar.freq'];
    for (const k of [0, 1]) {
      const mode = m.trueModes[k];
      const col = np[k].k;
      const shape = modeOutputShape(m, mode, names, { angleReference: 'tarrow-central.angle', reference: 'moorgate.mw' });
      const tc = m.outputs.find((o) => o.channel === 'tarrow-central.angle')!.c;
      const comp = names.map((name) => {
        const o = m.outputs.find((x) => x.channel === name)!;
        let re = 0;
        let im = 0;
        o.c.forEach((c, j) => {
          const cj = c - (o.kind === 'angle' ? tc[j] : 0);
          re += cj * ref[i].vre[j][col];
          im += cj * ref[i].vim[j][col];
        });
        return { re, im };
      });
      const maxMag = Math.max(...comp.map((z) => Math.hypot(z.re, z.im)));
      const ph0 = Math.atan2(comp[0].im, comp[0].re);
      shape.forEach((e, q) => {
        expect(e.magnitude).toBeCloseTo(Math.hypot(comp[q].re, comp[q].im) / maxMag, 8);
        let d = e.angleDeg - ((Math.atan2(comp[q].im, comp[q].re) - ph0) * 180) / Math.PI;
        d = ((((d + 180) % 360) + 360) % 360) - 180;
        expect(Math.abs(d)).toBeLessThan(1e-6);
      });
      // absolute angle channels reproduce the stored bus-angle shape
      const abs = modeOutputShape(m, mode, mode.shape.map((e) => e.channel), { reference: TARROW_ANGLE_REFERENCE });
      abs.forEach((e, q) => {
        expect(e.magnitude).toBeCloseTo(mode.shape[q].magnitude, 10);
        expect(e.angleDeg).toBeCloseTo(mode.shape[q].angleDeg, 8);
      });
    }
  });

  it('assigns one mode to each track, inside the track band', () => {
    for (const m of models) {
      for (const t of TARROW_TRACKS) {
        const mode = trackMode(m, t.code);
        expect(mode, `${t.code} at ${m.transferMw} MW`).toBeDefined();
        expect(mode!.frequencyHz).toBeGreaterThanOrEqual(t.minHz);
        expect(mode!.frequencyHz).toBeLessThanOrEqual(t.maxHz);
      }
      // local modes stay out of every track band, so trends follow one physical mode
      for (const mode of m.trueModes.filter((x) => x.track === null)) {
        for (const t of TARROW_TRACKS) expect(mode.frequencyHz < t.minHz || mode.frequencyHz > t.maxHz).toBe(true);
      }
    }
  });

  it('puts Highmoor against Saltreach in the north–south mode and Eastfell against Saltreach in the east–west mode', () => {
    const m = buildTarrowModel(1500);
    const ns = trackMode(m, 'north-south')!;
    const ew = trackMode(m, 'east-west')!;
    const ang = (mode: typeof ns, site: string) => mode.shape.find((e) => e.channel === `${site}.angle`)!.angleDeg;
    const apart = (a: number, b: number) => Math.abs(((((a - b + 180) % 360) + 360) % 360) - 180);
    expect(apart(ang(ns, 'moorgate'), ang(ns, 'saltreach-bay'))).toBeGreaterThan(150);
    expect(apart(ang(ew, 'windlow'), ang(ew, 'saltreach-bay'))).toBeGreaterThan(150);
    expect(apart(ang(ew, 'eastfell-ridge'), ang(ew, 'tarrow-central'))).toBeGreaterThan(150);
  });
});

describe('buildTarrowModel: calibration (DESIGN.md §2 targets)', () => {
  it('north–south ≈0.3 Hz, damping from 9 % at 500 MW falling monotonically under 3 % at high transfer', () => {
    let last = Infinity;
    for (let p = 0; p <= 3200; p += 100) {
      const ns = trackMode(buildTarrowModel(p), 'north-south')!;
      expect(ns.frequencyHz).toBeGreaterThan(0.29);
      expect(ns.frequencyHz).toBeLessThan(0.36);
      expect(ns.dampingPercent).toBeLessThan(last);
      last = ns.dampingPercent;
    }
    expect(trackMode(buildTarrowModel(500), 'north-south')!.dampingPercent).toBeCloseTo(9.0, 3);
    expect(trackMode(buildTarrowModel(2500), 'north-south')!.dampingPercent).toBeCloseTo(3.0, 3);
    expect(trackMode(buildTarrowModel(3000), 'north-south')!.dampingPercent).toBeLessThan(1.5);
  });

  it('crosses 5 % at 1866.5 MW and 3 % at 2500 MW (bisection on the eigenvalues)', () => {
    const p5 = transferAtDampingPercent('north-south', 5)!;
    const p3 = transferAtDampingPercent('north-south', 3)!;
    expect(p5).toBeGreaterThan(1866);
    expect(p5).toBeLessThan(1867);
    expect(Math.abs(p3 - 2500)).toBeLessThan(0.1);
    expect(trackMode(buildTarrowModel(p5), 'north-south')!.dampingPercent).toBeCloseTo(5, 3);
    expect(transferAtDampingPercent('east-west', 5)).toBeNull();
    expect(transferAtDampingPercent('north-south', 3, { corridorCircuitsOut: 1 })).toBeLessThan(p3);
  });

  it('east–west ≈0.56 Hz at 6–8 % and Greyscar ≈1.35 Hz at ≈10 % over the whole transfer range', () => {
    for (const m of models) {
      const ew = trackMode(m, 'east-west')!;
      const gs = trackMode(m, 'greyscar')!;
      expect(ew.dampingPercent).toBeGreaterThan(6);
      expect(ew.dampingPercent).toBeLessThan(8);
      expect(ew.frequencyHz).toBeGreaterThan(0.5);
      expect(ew.frequencyHz).toBeLessThan(0.65);
      expect(gs.dampingPercent).toBeGreaterThan(9.5);
      expect(gs.dampingPercent).toBeLessThan(11);
      expect(gs.frequencyHz).toBeGreaterThan(1.25);
      expect(gs.frequencyHz).toBeLessThan(1.4);
    }
  });

  it('without the excitation torque shows the classical-model trap: damping ratio RISES and frequency falls with transfer (textbook: Kundur 1994 ch. 12, ζ = D/2√(M·Ks))', () => {
    const off = { excitation: { gain: 0, zeroMw: 0 } };
    const lo = trackMode(buildTarrowModel(500, off), 'north-south')!;
    const hi = trackMode(buildTarrowModel(3000, off), 'north-south')!;
    expect(hi.dampingPercent).toBeGreaterThan(lo.dampingPercent);
    expect(hi.frequencyHz).toBeLessThan(lo.frequencyHz);
  });
});

describe('buildTarrowModel: operating point and outputs', () => {
  it('carries the transfer on the corridor and the Eastfell export on the tie (power balance)', () => {
    for (const m of models) {
      const flow = (name: string) => m.outputs.find((o) => o.channel === name)!.steady;
      expect(flow('moorgate.mw')).toBeCloseTo(m.transferMw, 6);
      expect(flow('eastfell-ridge.mw')).toBeCloseTo(600, 6);
    }
  });

  it('opens the corridor angle with the transfer and keeps it under the practical 45° limit at 3200 MW (common practice)', () => {
    const corr = (m: TarrowModel) =>
      m.outputs.find((o) => o.channel === 'moorgate.angle')!.steady - m.outputs.find((o) => o.channel === 'saltreach-bay.angle')!.steady;
    const angles = models.map(corr);
    for (let i = 1; i < angles.length; i++) expect(angles[i]).toBeGreaterThan(angles[i - 1]);
    expect(angles[0]).toBeCloseTo(0, 9);
    expect(angles[angles.length - 1]).toBeLessThan(45);
    expect(angles[angles.length - 1]).toBeGreaterThan(30);
  });

  it('has linear output rows consistent with the nonlinear operating points (c·Δδ ≈ Δ steady)', () => {
    const a = buildTarrowModel(2000);
    const b = buildTarrowModel(2005);
    const dDelta = a.network.machineAngles.map((v, g) => b.network.machineAngles[g] - v);
    for (const out of a.outputs) {
      if (out.kind === 'frequency') continue;
      const predicted = out.c.slice(0, dDelta.length).reduce((s, c, g) => s + c * dDelta[g], 0);
      const actual = b.outputs.find((o) => o.channel === out.channel)!.steady - out.steady;
      expect(Math.abs(predicted - actual), out.channel).toBeLessThan(0.002 * Math.max(1, Math.abs(actual)));
    }
  });

  it('exposes one output per Tarrow channel, in TARROW_CHANNELS order', () => {
    expect(models[0].outputs.map((o) => o.channel)).toEqual(TARROW_CHANNELS.map((c) => c.name));
    expect(models[0].A.length).toBe(18);
    expect(models[0].B[0].length).toBe(models[0].noiseInputs.length);
  });

  it('refuses transfers outside the modelled range and bad circuit counts, naming the value', () => {
    expect(() => buildTarrowModel(3500)).toThrow('transferMw 3500 is outside the modelled Highmoor–Saltreach range 0–3200 MW');
    expect(() => buildTarrowModel(-1)).toThrow('transferMw -1 is outside the modelled Highmoor–Saltreach range 0–3200 MW');
    expect(() => buildTarrowModel(NaN)).toThrow('transferMw must be a finite number of MW, got NaN');
    expect(() => buildTarrowModel(1000, { corridorCircuitsOut: 4 })).toThrow('corridorCircuitsOut must be an integer from 0 to 3, got 4');
    expect(() => transferAtDampingPercent('diagonal', 3)).toThrow('Unknown mode track diagonal; expected one of north-south, east-west, greyscar');
  });
});
