// Known-answer ambient data for tests and benchmarks (not a power-system model: the Tarrow
// simulator in modal/simulator/ is). Each mode is a complex first-order process
//   q[n] = z·q[n−1] + e[n],  z = exp(s/fs),  s = −ζ·ωn + i·ωn·√(1−ζ²),
// driven by complex white noise, and channel c is Re(Σ_m φ_{c,m}·q_m[n]) plus white measurement
// noise. The real series then has exactly the poles z, z̄ of each mode (CHECKS.md §1: the
// continuous pole s sampled at fs maps to z = e^{s/fs}), and near the modal frequency the
// cross-spectrum between channels has the phase of φ_c·conj(φ_d): φ is the true mode shape.
// A forced oscillation adds A_c·cos(2π·f·t + θ_c) to the channels.
import { createRng } from './random';
import type { Complex } from './linalg';
import type { SampledRecord } from './types';

export interface SynthMode {
  /** Damped frequency, Hz. */
  frequencyHz: number;
  dampingPercent: number;
  /** Complex shape per channel (φ_c), in channel units per unit of the modal coordinate. */
  shape: Complex[];
  /** Standard deviation of |q| (the modal coordinate's RMS). Default 1. */
  amplitude?: number;
}

export interface SynthForced {
  frequencyHz: number;
  /** Peak amplitude per channel, channel units. */
  amplitude: number[];
  /** Phase per channel, degrees. Default 0. */
  phaseDeg?: number[];
}

export interface SynthOptions {
  rate: number;
  seconds: number;
  names: string[];
  modes: SynthMode[];
  /** White measurement-noise standard deviation per channel (or one for all). Default 0. */
  noiseStd?: number | number[];
  forced?: SynthForced[];
  seed: number;
  startTime?: number;
  /** Constant offset per channel (e.g. a steady angle), channel units. Default 0. */
  offset?: number[];
}

/** Continuous pole of a mode given by damped frequency and damping ratio. */
export function modePole(frequencyHz: number, dampingPercent: number): Complex {
  const zeta = dampingPercent / 100;
  const wd = 2 * Math.PI * frequencyHz;
  const wn = wd / Math.sqrt(1 - zeta * zeta);
  return { re: -zeta * wn, im: wd };
}

/** Generator state, so that long records can be made chunk by chunk (benchmarks). */
export class AmbientSynth {
  private readonly o: SynthOptions;
  private readonly rng: ReturnType<typeof createRng>;
  private readonly z: Complex[];
  private readonly eStd: number[];
  private readonly q: Complex[];
  private readonly noise: number[];
  private n = 0;

  constructor(o: SynthOptions) {
    this.o = o;
    this.rng = createRng(o.seed);
    const C = o.names.length;
    this.noise = Array.isArray(o.noiseStd) ? o.noiseStd : new Array(C).fill(o.noiseStd ?? 0);
    this.z = o.modes.map((m) => {
      const s = modePole(m.frequencyHz, m.dampingPercent);
      const r = Math.exp(s.re / o.rate);
      return { re: r * Math.cos(s.im / o.rate), im: r * Math.sin(s.im / o.rate) };
    });
    this.eStd = o.modes.map((m, i) => {
      const a = m.amplitude ?? 1;
      const r2 = this.z[i].re ** 2 + this.z[i].im ** 2;
      return a * Math.sqrt((1 - r2) / 2);
    });
    // start in the stationary distribution: q ~ CN(0, A²)
    this.q = o.modes.map((m) => {
      const a = (m.amplitude ?? 1) / Math.SQRT2;
      return { re: a * this.rng.normal(), im: a * this.rng.normal() };
    });
  }

  /** Next `count` samples of every channel. */
  next(count: number): Float64Array[] {
    const o = this.o;
    const C = o.names.length;
    const out = Array.from({ length: C }, () => new Float64Array(count));
    const M = o.modes.length;
    for (let i = 0; i < count; i++) {
      const t = (this.n + i) / o.rate;
      for (let m = 0; m < M; m++) {
        const q = this.q[m];
        const z = this.z[m];
        const re = z.re * q.re - z.im * q.im + this.eStd[m] * this.rng.normal();
        const im = z.re * q.im + z.im * q.re + this.eStd[m] * this.rng.normal();
        q.re = re;
        q.im = im;
        const sh = o.modes[m].shape;
        for (let c = 0; c < C; c++) out[c][i] += sh[c].re * re - sh[c].im * im;
      }
      for (let c = 0; c < C; c++) {
        if (this.noise[c] > 0) out[c][i] += this.noise[c] * this.rng.normal();
        if (o.offset) out[c][i] += o.offset[c];
      }
      if (o.forced) {
        for (const f of o.forced) {
          for (let c = 0; c < C; c++) {
            const ph = ((f.phaseDeg?.[c] ?? 0) * Math.PI) / 180;
            out[c][i] += f.amplitude[c] * Math.cos(2 * Math.PI * f.frequencyHz * t + ph);
          }
        }
      }
    }
    this.n += count;
    return out;
  }
}

/** A whole record from SynthOptions. */
export function synthAmbient(o: SynthOptions): SampledRecord {
  const n = Math.round(o.seconds * o.rate);
  const data = new AmbientSynth(o).next(n);
  return { startTime: o.startTime ?? 0, rate: o.rate, channels: o.names.map((name, c) => ({ name, values: data[c] })) };
}
