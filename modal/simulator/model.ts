// The Tarrow simulator's model: a linearised classical-model multi-machine system (DESIGN.md §5.6).
//
// Physics (textbook: Kundur, Power System Stability and Control, 1994, ch. 12):
//  - each machine is a constant EMF E' = 1.05 pu behind its transient reactance X'd; swing equation
//    M δ'' + D δ' = Pm − Pe with M = 2H·S/(ω0·S_base) (pu·s²/rad, δ in rad, ω in rad/s);
//  - lossless network, every bus held at 1.0 pu (a stated simplification: no voltage dynamics),
//    constant-power loads; the operating point comes from a Newton power flow on the angles;
//  - linearising P_ij = E_i E_j / X_ij · sin(θ_i − θ_j) gives a Laplacian with weights
//    E_i E_j / X_ij · cos(θ_i0 − θ_j0): the synchronising coefficients fall as the transfer (angle)
//    rises, Ks = E1 E2 / X · cos δ0. Kron reduction onto the machine nodes gives K in
//    M δ'' + D δ' + K δ = (load noise), and bus angles follow machine angles through −Lnn⁻¹ Lng.
//
// The damping trap (DESIGN.md §5.6): with fixed D the classical model's damping ratio RISES as the
// transfer rises (ζ = D / 2√(M·Ks) and Ks falls). Real grids lose damping at high transfer through
// the negative damping torque of fast excitation systems on heavily loaded machines (textbook:
// Kundur 1994, ch. 12; paper: F. P. de Mello & C. Concordia, IEEE Trans. PAS-88(4), 1969). The model
// represents that as a STATED SIMPLIFICATION: an excitation damping torque on the Highmoor hydro
// fleet equivalent (the exporting area's bulk generation),
//     T_exc = −D_exc(P) · (Δω_i − Δω_COI),   D_exc(P) / M_i = EXCITATION_GAIN · (P0 − P) / 1000 MW,
// positive at light transfer and negative above P0. It acts on the machine's speed relative to the
// centre of inertia, so it shapes the oscillations without touching the system frequency response.
//
// Ambient drive (the B matrix): every load's random fluctuation, and the random mechanical power of
// the Greyscar hydro units (TARROW_MECHANICAL_NOISE_MW: turbulent flow through penstock and
// turbine). The Greyscar units sit behind a long line from Moorgate, so the Highmoor loads' noise
// reaches their rotor at about 1 % and the Greyscar local mode (1.35 Hz) stayed invisible in ambient
// data; their own mechanical noise acts on that rotor directly and makes it a clear peak in the
// Greyscar channels. It adds inputs only: the operating point, the eigenvalues and the calibration
// below are unchanged.
//
// Calibration (EXCITATION_GAIN and EXCITATION_ZERO_MW below, solved by Newton on the true
// eigenvalues so that the north–south mode has 9.0 % damping at 500 MW and 3.0 % at 2500 MW):
//   transfer MW   north–south Hz / %    east–west Hz / %    Greyscar Hz / %
//        0          0.344 / 10.4          0.563 / 7.5          1.347 / 10.3
//      500          0.343 /  9.0          0.562 / 7.5          1.347 / 10.3
//     1000          0.342 /  7.6          0.562 / 7.5          1.347 / 10.3
//     1500          0.338 /  6.1          0.561 / 7.5          1.347 / 10.3
//     2000          0.332 /  4.6          0.559 / 7.5          1.347 / 10.3
//     2500          0.325 /  3.0          0.558 / 7.6          1.347 / 10.3
//     3000          0.313 /  1.3          0.556 / 7.7          1.346 / 10.3
//     3200          0.308 /  0.6          0.555 / 7.7          1.346 / 10.3
// so the north–south damping crosses 5 % at ≈ 1867 MW and 3 % at ≈ 2500 MW (transferAtDampingPercent;
// the unit test checks both). After one corridor circuit trips (3 of 4 left) the crossings move to
// ≈ 1915 MW (5 %) and ≈ 2461 MW (3 %). Other (local) modes sit at 1.8–2.4 Hz with 6–8 % damping, outside
// every track band.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { ModalInputError } from '../errors';
import type { ModePole, ShapeEntry } from '../types';
import {
  TARROW_ANGLE_REFERENCE,
  TARROW_CHANNELS,
  TARROW_CORRIDORS,
  TARROW_EASTFELL_EXPORT_MW,
  TARROW_LINES,
  TARROW_LOADS_MW,
  TARROW_MACHINES,
  TARROW_MECHANICAL_NOISE_MW,
  TARROW_NOMINAL_HZ,
  TARROW_SITES,
  TARROW_TRACKS,
  TARROW_TRANSFER_RANGE_MW,
  type ChannelKind,
} from '../../fixtures/tarrow-network';
import { solve } from './dense';

/** System MVA base of the per-unit model. */
export const BASE_MVA = 100;
const OMEGA0 = 2 * Math.PI * TARROW_NOMINAL_HZ;
/** Internal EMF magnitude of every machine, pu. */
const EMF = 1.05;

/** Excitation damping gain, (1/s per unit inertia) per 1000 MW of Highmoor–Saltreach transfer. */
export const EXCITATION_GAIN = 0.2303049023;
/** Transfer at which the excitation damping torque changes sign, MW. */
export const EXCITATION_ZERO_MW = 418.5770021;
/** Machines that carry the transfer-dependent excitation torque (the exporting area's bulk). */
export const EXCITATION_MACHINES = ['highmoor-hydro-eq'];

export interface ModelOutput {
  channel: string;
  site: string;
  kind: ChannelKind;
  unit: 'deg' | 'Hz' | 'MW';
  /** Value at the operating point: angle (deg, Tarrow Central = 0), 60 Hz, or MW flow. */
  steady: number;
  /** Output row on the state vector (deg/rad on δ, Hz/(rad/s) on Δω, MW/rad on δ). */
  c: number[];
}

export interface TrueMode extends ModePole {
  /** Mode track code (TARROW_TRACKS) or null for a local mode nobody tracks. */
  track: string | null;
  /** Track code, or `local:<machine>` for the machine with the largest share of the mode's energy. */
  label: string;
  dominantMachine: string;
  /** Bus-angle mode shape per angle channel: magnitude (largest = 1), angle relative to the reference. */
  shape: ShapeEntry[];
  /** Right eigenvector in state order (model.stateNames), for modeOutputShape. */
  eigenvector: { re: number[]; im: number[] };
}

export interface TarrowModelOptions {
  /** Circuits of the Highmoor–Saltreach corridor out of service (0 normally, 1 after a line trip). */
  corridorCircuitsOut?: number;
  /** Overrides of the excitation-torque constants, for the calibration script only. */
  excitation?: { gain: number; zeroMw: number };
}

/** The linearised model at one operating point. State: δ (rad) of every machine, then Δω (rad/s). */
export interface TarrowModel {
  transferMw: number;
  corridorCircuitsOut: number;
  machines: string[];
  stateNames: string[];
  /** State matrix, 2·machines × 2·machines. */
  A: number[][];
  /**
   * Noise input: d(state)/dt per MW of each `noiseInputs` entry (rad/s² per MW): a load increase at
   * a site (entry = the site code), or a mechanical-power increase of a unit (`<machine>.mechanical`).
   */
  B: number[][];
  noiseInputs: string[];
  /**
   * Per noise input, the MW whose fraction `loadNoise` is the RMS of the input's 1-second average
   * (the load itself; TARROW_MECHANICAL_NOISE_MW for a unit's mechanical power).
   */
  noiseScaleMw: number[];
  outputs: ModelOutput[];
  /** Oscillatory modes (upper half-plane), sorted by frequency. */
  trueModes: TrueMode[];
  /** Excitation damping on the Highmoor equivalent at this transfer, D_exc/M in 1/s. */
  excitationDampingPerInertia: number;
  /** Internals the simulator needs for events and injections. */
  network: ModelNetwork;
}

export interface ModelNetwork {
  sites: string[];
  /** Inertia M per machine, pu·s²/rad on BASE_MVA. */
  inertia: number[];
  /** Equilibrium machine internal angles, rad, in the output reference (Tarrow Central bus = 0). */
  machineAngles: number[];
  /** State-derivative column per MW injected at each site (index as `sites`). */
  injection: number[][];
  /** Bus-angle feedthrough of an injection: rad at site i per MW injected at site j. */
  angleFeed: number[][];
  /** Corridor flow linearisation: MW per rad of (from-bus − to-bus) angle, by corridor code. */
  corridorGain: Record<string, number>;
}

const SITE_CODES = TARROW_SITES.map((s) => s.code);

function checkModelInputs(transferMw: number, circuitsOut: number): void {
  const [lo, hi] = TARROW_TRANSFER_RANGE_MW;
  if (typeof transferMw !== 'number' || !Number.isFinite(transferMw)) {
    throw new ModalInputError(`transferMw must be a finite number of MW, got ${String(transferMw)}`);
  }
  if (transferMw < lo || transferMw > hi) {
    throw new ModalInputError(
      `transferMw ${transferMw} is outside the modelled Highmoor–Saltreach range ${lo}–${hi} MW`,
    );
  }
  const corridor = TARROW_LINES.find((l) => l.corridor === 'highmoor-saltreach')!;
  if (!Number.isInteger(circuitsOut) || circuitsOut < 0 || circuitsOut >= corridor.circuits) {
    throw new ModalInputError(
      `corridorCircuitsOut must be an integer from 0 to ${corridor.circuits - 1}, got ${circuitsOut}`,
    );
  }
}

/** Builds the linearised Tarrow model at a Highmoor–Saltreach transfer (MW). */
export function buildTarrowModel(transferMw: number, options: TarrowModelOptions = {}): TarrowModel {
  const circuitsOut = options.corridorCircuitsOut ?? 0;
  checkModelInputs(transferMw, circuitsOut);
  const machines = TARROW_MACHINES;
  const ng = machines.length;
  const nb = SITE_CODES.length;
  const N = ng + nb;
  const busIndex = (site: string): number => {
    const k = SITE_CODES.indexOf(site);
    if (k < 0) throw new ModalInputError(`Unknown site ${site}`);
    return ng + k;
  };

  // --- dispatch (MW → pu). Highmoor exports the transfer, Eastfell its fixed export, the rest balance.
  const inj = new Float64Array(N);
  const areaOf = (site: string) => TARROW_SITES.find((s) => s.code === site)!.area;
  const loadIn = (area: string) =>
    Object.entries(TARROW_LOADS_MW).reduce((s, [site, mw]) => (areaOf(site) === area ? s + mw : s), 0);
  const totalLoad = Object.values(TARROW_LOADS_MW).reduce((a, b) => a + b, 0);
  const highmoorGen = loadIn('highmoor') + transferMw;
  const eastfellGen = loadIn('eastfell') + TARROW_EASTFELL_EXPORT_MW;
  const restGen = totalLoad - highmoorGen - eastfellGen;
  const groups: [string[], number][] = [
    [['highmoor'], highmoorGen],
    [['eastfell'], eastfellGen],
    [['tarrow-valley', 'saltreach'], restGen],
  ];
  for (const [areas, total] of groups) {
    const members = machines.map((m, i) => [m, i] as const).filter(([m]) => areas.includes(m.area));
    const mva = members.reduce((s, [m]) => s + m.mva, 0);
    for (const [m, i] of members) inj[i] = (total * m.mva) / mva / BASE_MVA;
  }
  for (const [site, mw] of Object.entries(TARROW_LOADS_MW)) inj[busIndex(site)] -= mw / BASE_MVA;

  // --- susceptances and voltage magnitudes
  const bmat = new Float64Array(N * N);
  const vmag = new Float64Array(N).fill(1);
  for (let i = 0; i < ng; i++) vmag[i] = EMF;
  const addBranch = (i: number, j: number, x: number) => {
    bmat[i * N + j] += 1 / x;
    bmat[j * N + i] += 1 / x;
  };
  const corridorX: Record<string, { from: number; to: number; b: number }> = {};
  for (const line of TARROW_LINES) {
    let x = line.x;
    if (line.corridor === 'highmoor-saltreach' && circuitsOut > 0) {
      x = (line.x * line.circuits) / (line.circuits - circuitsOut);
    }
    const i = busIndex(line.from);
    const j = busIndex(line.to);
    addBranch(i, j, x);
    if (line.corridor) corridorX[line.corridor] = { from: i, to: j, b: 1 / x };
  }
  for (let g = 0; g < ng; g++) {
    const m = machines[g];
    addBranch(g, busIndex(m.site), (m.xdPrime * BASE_MVA) / m.mva);
  }

  // --- Newton power flow on the angles (slack: the Saltreach Bay equivalent's internal node)
  const slack = machines.findIndex((m) => m.code === 'saltreach-bay-eq');
  const theta = new Float64Array(N);
  const unknown = [...Array(N).keys()].filter((k) => k !== slack);
  const nu = unknown.length;
  for (let iter = 0; iter < 50; iter++) {
    const mis = new Float64Array(nu);
    const jac = new Float64Array(nu * nu);
    let worst = 0;
    for (let a = 0; a < nu; a++) {
      const i = unknown[a];
      let p = 0;
      for (let k = 0; k < N; k++) {
        const b = bmat[i * N + k];
        if (b !== 0) p += vmag[i] * vmag[k] * b * Math.sin(theta[i] - theta[k]);
      }
      mis[a] = inj[i] - p;
      worst = Math.max(worst, Math.abs(mis[a]));
      for (let c = 0; c < nu; c++) {
        const k = unknown[c];
        if (k === i) {
          let d = 0;
          for (let q = 0; q < N; q++) {
            const b = bmat[i * N + q];
            if (b !== 0 && q !== i) d += vmag[i] * vmag[q] * b * Math.cos(theta[i] - theta[q]);
          }
          jac[a * nu + c] = d;
        } else {
          const b = bmat[i * N + k];
          jac[a * nu + c] = b === 0 ? 0 : -vmag[i] * vmag[k] * b * Math.cos(theta[i] - theta[k]);
        }
      }
    }
    if (worst < 1e-11) break;
    if (iter === 49) throw new ModalInputError(`Power flow did not converge at ${transferMw} MW (mismatch ${worst} pu)`);
    const step = solve(jac, mis, nu, 1);
    for (let a = 0; a < nu; a++) theta[unknown[a]] += step[a];
  }
  // Output reference: the Tarrow Central bus angle is 0.
  const refBus = busIndex('tarrow-central');
  const ref = theta[refBus];
  for (let k = 0; k < N; k++) theta[k] -= ref;

  // --- linearisation: weighted Laplacian, Kron reduction
  const L = new Float64Array(N * N);
  for (let i = 0; i < N; i++) {
    for (let k = 0; k < N; k++) {
      const b = bmat[i * N + k];
      if (b === 0 || i === k) continue;
      const w = vmag[i] * vmag[k] * b * Math.cos(theta[i] - theta[k]);
      L[i * N + k] = -w;
      L[i * N + i] += w;
    }
  }
  const lnn = new Float64Array(nb * nb);
  const lng = new Float64Array(nb * ng);
  for (let i = 0; i < nb; i++) {
    for (let k = 0; k < nb; k++) lnn[i * nb + k] = L[(ng + i) * N + ng + k];
    for (let g = 0; g < ng; g++) lng[i * ng + g] = L[(ng + i) * N + g];
  }
  // Tn = −Lnn⁻¹ Lng (bus angle per machine angle); lnnInv for injections.
  const eye = new Float64Array(nb * nb);
  for (let i = 0; i < nb; i++) eye[i * nb + i] = 1;
  const lnnInv = solve(lnn, eye, nb, nb);
  const tn = new Float64Array(nb * ng);
  for (let i = 0; i < nb; i++) {
    for (let g = 0; g < ng; g++) {
      let s = 0;
      for (let k = 0; k < nb; k++) s += lnnInv[i * nb + k] * lng[k * ng + g];
      tn[i * ng + g] = -s;
    }
  }
  // K = Lgg − Lgn Lnn⁻¹ Lng = Lgg + Lgn Tn
  const K = new Float64Array(ng * ng);
  for (let g = 0; g < ng; g++) {
    for (let h = 0; h < ng; h++) {
      let s = L[g * N + h];
      for (let k = 0; k < nb; k++) s += L[g * N + ng + k] * tn[k * ng + h];
      K[g * ng + h] = s;
    }
  }
  // Injection ΔP at bus k (pu) → machine electrical power change −(Lgn Lnn⁻¹)[g][k]·ΔP... i.e.
  // M Δω' = −K δ − D Δω + G ΔP_inj with G = −Lgn Lnn⁻¹ (an injection near a machine unloads it).
  const G = new Float64Array(ng * nb);
  for (let g = 0; g < ng; g++) {
    for (let k = 0; k < nb; k++) {
      let s = 0;
      for (let q = 0; q < nb; q++) s += L[g * N + ng + q] * lnnInv[q * nb + k];
      G[g * nb + k] = -s;
    }
  }

  // --- inertia and damping
  const M = machines.map((m) => (2 * m.inertiaH * m.mva) / (OMEGA0 * BASE_MVA));
  const Mtot = M.reduce((a, b) => a + b, 0);
  const exc = options.excitation ?? { gain: EXCITATION_GAIN, zeroMw: EXCITATION_ZERO_MW };
  const excPerInertia = (exc.gain * (exc.zeroMw - transferMw)) / 1000;
  const Dm = new Float64Array(ng * ng);
  for (let g = 0; g < ng; g++) Dm[g * ng + g] = machines[g].dampingPerInertia * M[g];
  for (const code of EXCITATION_MACHINES) {
    const g = machines.findIndex((m) => m.code === code);
    const dExc = excPerInertia * M[g];
    Dm[g * ng + g] += dExc;
    for (let h = 0; h < ng; h++) Dm[g * ng + h] -= (dExc * M[h]) / Mtot;
  }

  // --- state matrix
  const n = 2 * ng;
  const A: number[][] = [...Array(n)].map(() => new Array<number>(n).fill(0));
  for (let g = 0; g < ng; g++) {
    A[g][ng + g] = 1;
    for (let h = 0; h < ng; h++) {
      A[ng + g][h] = -K[g * ng + h] / M[g];
      A[ng + g][ng + h] = -Dm[g * ng + h] / M[g];
    }
  }
  const injection: number[][] = SITE_CODES.map((_, k) => {
    const col = new Array<number>(n).fill(0);
    for (let g = 0; g < ng; g++) col[ng + g] = G[g * nb + k] / (M[g] * BASE_MVA);
    return col;
  });
  // Ambient drive: every load's random fluctuation, then the hydro units' mechanical-power
  // fluctuation (TARROW_MECHANICAL_NOISE_MW), which acts on the unit's own rotor only.
  const loadSites = Object.keys(TARROW_LOADS_MW);
  const mechMachines = Object.keys(TARROW_MECHANICAL_NOISE_MW);
  const noiseInputs = [...loadSites, ...mechMachines.map((m) => `${m}.mechanical`)];
  const noiseScaleMw = [...loadSites.map((s) => TARROW_LOADS_MW[s]), ...mechMachines.map((m) => TARROW_MECHANICAL_NOISE_MW[m])];
  const B: number[][] = [...Array(n)].map(() => new Array<number>(noiseInputs.length).fill(0));
  loadSites.forEach((site, c) => {
    const col = injection[SITE_CODES.indexOf(site)];
    for (let i = 0; i < n; i++) B[i][c] = -col[i]; // a load increase is a negative injection
  });
  mechMachines.forEach((code, k) => {
    const g = machines.findIndex((m) => m.code === code);
    if (g < 0) throw new ModalInputError(`TARROW_MECHANICAL_NOISE_MW names ${code}, which is not a Tarrow machine`);
    B[ng + g][loadSites.length + k] = 1 / (M[g] * BASE_MVA); // M Δω' = ΔPm (pu)
  });
  const angleFeed: number[][] = SITE_CODES.map((_, i) => SITE_CODES.map((__, k) => lnnInv[i * nb + k] / BASE_MVA));

  // --- outputs
  const corridorGain: Record<string, number> = {};
  for (const [code, c] of Object.entries(corridorX)) {
    corridorGain[code] = BASE_MVA * c.b * Math.cos(theta[c.from] - theta[c.to]);
  }
  const outputs: ModelOutput[] = TARROW_CHANNELS.map((ch) => {
    const k = SITE_CODES.indexOf(ch.site);
    const c = new Array<number>(n).fill(0);
    let steady: number;
    if (ch.kind === 'angle') {
      for (let g = 0; g < ng; g++) c[g] = (180 / Math.PI) * tn[k * ng + g];
      steady = (180 / Math.PI) * theta[ng + k];
    } else if (ch.kind === 'frequency') {
      // Bus frequency as the network-weighted rotor speeds (stated simplification: the algebraic
      // part of the white load noise is left out of bus angles and frequencies).
      for (let g = 0; g < ng; g++) c[ng + g] = tn[k * ng + g] / (2 * Math.PI);
      steady = TARROW_NOMINAL_HZ;
    } else {
      const cor = TARROW_CORRIDORS.find((x) => x.flowChannel === ch.name);
      if (!cor) throw new ModalInputError(`No corridor for flow channel ${ch.name}`);
      const f = corridorX[cor.code];
      const kf = f.from - ng;
      const kt = f.to - ng;
      const gain = corridorGain[cor.code];
      for (let g = 0; g < ng; g++) c[g] = gain * (tn[kf * ng + g] - tn[kt * ng + g]);
      steady = BASE_MVA * f.b * Math.sin(theta[f.from] - theta[f.to]);
      // Orientation: positive from the corridor's fromSite to its toSite.
      if (SITE_CODES[kf] !== cor.fromSite) {
        steady = -steady;
        for (let g = 0; g < ng; g++) c[g] = -c[g];
      }
    }
    return { channel: ch.name, site: ch.site, kind: ch.kind, unit: ch.unit, steady, c };
  });

  const model: TarrowModel = {
    transferMw,
    corridorCircuitsOut: circuitsOut,
    machines: machines.map((m) => m.code),
    stateNames: [...machines.map((m) => `${m.code}.delta`), ...machines.map((m) => `${m.code}.speed`)],
    A,
    B,
    noiseInputs,
    noiseScaleMw,
    outputs,
    trueModes: [],
    excitationDampingPerInertia: excPerInertia,
    network: {
      sites: SITE_CODES,
      inertia: M,
      machineAngles: Array.from(theta.subarray(0, ng)),
      injection,
      angleFeed,
      corridorGain,
    },
  };
  model.trueModes = computeTrueModes(model, tn);
  return model;
}

interface Cx {
  re: number;
  im: number;
}

function computeTrueModes(model: TarrowModel, tn: Float64Array): TrueMode[] {
  const ng = model.machines.length;
  const n = 2 * ng;
  const evd = new EigenvalueDecomposition(new Matrix(model.A));
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  const V = evd.eigenvectorMatrix;
  const angleOutputs = model.outputs.filter((o) => o.kind === 'angle');
  const refIdx = angleOutputs.findIndex((o) => o.channel === TARROW_ANGLE_REFERENCE);
  const modes: TrueMode[] = [];
  for (let j = 0; j < n; j++) {
    if (!(im[j] !== 0 && j + 1 < n && im[j + 1] === -im[j])) continue;
    // Columns j, j+1 hold u, w with A(u + i w) = (re + i im_j)(u + i w) (real Schur form of the
    // EISPACK/JAMA routine). Keep the member with positive imaginary part.
    const sign = im[j] > 0 ? 1 : -1;
    const vec: Cx[] = [];
    for (let i = 0; i < n; i++) vec.push({ re: V.get(i, j), im: sign * V.get(i, j + 1) });
    const lam: Cx = { re: re[j], im: Math.abs(im[j]) };
    checkEigenpair(model.A, lam, vec);
    j++;
    const omega = lam.im;
    if (omega < 1e-6) continue;
    const mag = Math.hypot(lam.re, lam.im);
    const zeta = -lam.re / mag;
    // Bus-angle shape: Tn · v_δ
    const bus: Cx[] = angleOutputs.map((o) => {
      const k = model.network.sites.indexOf(o.site);
      let sr = 0;
      let si = 0;
      for (let g = 0; g < ng; g++) {
        sr += tn[k * ng + g] * vec[g].re;
        si += tn[k * ng + g] * vec[g].im;
      }
      return { re: sr, im: si };
    });
    const maxMag = Math.max(...bus.map((z) => Math.hypot(z.re, z.im)));
    const refPhase = Math.atan2(bus[refIdx].im, bus[refIdx].re);
    const shape: ShapeEntry[] = angleOutputs.map((o, k) => ({
      channel: o.channel,
      magnitude: Math.hypot(bus[k].re, bus[k].im) / maxMag,
      angleDeg: wrap180(((Math.atan2(bus[k].im, bus[k].re) - refPhase) * 180) / Math.PI),
    }));
    // Energy share by machine (kinetic, M |v_ω|²) to name the mode.
    let best = 0;
    let bestE = -1;
    for (let g = 0; g < ng; g++) {
      const e = model.network.inertia[g] * (vec[ng + g].re ** 2 + vec[ng + g].im ** 2);
      if (e > bestE) {
        bestE = e;
        best = g;
      }
    }
    modes.push({
      frequencyHz: omega / (2 * Math.PI),
      dampingRatio: zeta,
      dampingPercent: 100 * zeta,
      sigma: lam.re,
      omega,
      track: null,
      label: `local:${model.machines[best]}`,
      dominantMachine: model.machines[best],
      shape,
      eigenvector: { re: vec.map((z) => z.re), im: vec.map((z) => z.im) },
    });
  }
  modes.sort((a, b) => a.frequencyHz - b.frequencyHz);
  for (const track of TARROW_TRACKS) {
    const inBand = modes.filter((m) => m.frequencyHz >= track.minHz && m.frequencyHz <= track.maxHz && m.track === null);
    if (inBand.length === 0) continue;
    let chosen = inBand[0];
    let bestScore = -Infinity;
    for (const m of inBand) {
      const s = signPatternScore(m.shape, track.reference.groupA, track.reference.groupB);
      if (s > bestScore) {
        bestScore = s;
        chosen = m;
      }
    }
    chosen.track = track.code;
    chosen.label = track.code;
  }
  return modes;
}

/** Σ |a||b|·(−cos(∠a − ∠b)) over the two groups' angle channels: large when they swing apart. */
function signPatternScore(shape: ShapeEntry[], groupA: string[], groupB: string[]): number {
  const get = (site: string) => shape.find((e) => e.channel === `${site}.angle`);
  let s = 0;
  for (const a of groupA) {
    for (const b of groupB) {
      const ea = get(a);
      const eb = get(b);
      if (!ea || !eb) continue;
      s -= ea.magnitude * eb.magnitude * Math.cos(((ea.angleDeg - eb.angleDeg) * Math.PI) / 180);
    }
  }
  return s;
}

function checkEigenpair(A: number[][], lam: Cx, v: Cx[]): void {
  const n = v.length;
  let res = 0;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    let sr = 0;
    let si = 0;
    for (let k = 0; k < n; k++) {
      sr += A[i][k] * v[k].re;
      si += A[i][k] * v[k].im;
    }
    sr -= lam.re * v[i].re - lam.im * v[i].im;
    si -= lam.re * v[i].im + lam.im * v[i].re;
    res += sr * sr + si * si;
    norm += v[i].re ** 2 + v[i].im ** 2;
  }
  const scale = Math.hypot(lam.re, lam.im) + 1;
  if (!(Math.sqrt(res) <= 1e-8 * scale * Math.sqrt(norm))) {
    throw new Error(`Eigenvector check failed for λ = ${lam.re} + ${lam.im}i (residual ${Math.sqrt(res)})`);
  }
}

export function wrap180(deg: number): number {
  let a = deg % 360;
  if (a <= -180) a += 360;
  else if (a > 180) a -= 360;
  return a;
}

/** The true mode of a track in a model, or undefined when no mode falls in the track's band. */
export function trackMode(model: TarrowModel, track: string): TrueMode | undefined {
  return model.trueModes.find((m) => m.track === track);
}

/**
 * The Highmoor–Saltreach transfer (MW) at which a track's true damping equals `percent`, by bisection
 * on the model's eigenvalues over the modelled range; null when the damping does not cross `percent`
 * inside the range. `corridorCircuitsOut` studies the post-line-trip network.
 */
export function transferAtDampingPercent(track: string, percent: number, options: TarrowModelOptions = {}): number | null {
  if (!TARROW_TRACKS.some((t) => t.code === track)) {
    throw new ModalInputError(`Unknown mode track ${track}; expected one of ${TARROW_TRACKS.map((t) => t.code).join(', ')}`);
  }
  if (!Number.isFinite(percent)) throw new ModalInputError(`percent must be a finite number, got ${percent}`);
  const [lo, hi] = TARROW_TRANSFER_RANGE_MW;
  const f = (p: number): number => {
    const m = trackMode(buildTarrowModel(p, options), track);
    if (!m) throw new ModalInputError(`Track ${track} has no mode in its band at ${p} MW`);
    return m.dampingPercent - percent;
  };
  let a = lo;
  let b = hi;
  let fa = f(a);
  const fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (Math.sign(fa) === Math.sign(fb)) return null;
  while (b - a > 0.01) {
    const mid = 0.5 * (a + b);
    const fm = f(mid);
    if (Math.sign(fm) === Math.sign(fa)) {
      a = mid;
      fa = fm;
    } else {
      b = mid;
    }
  }
  return 0.5 * (a + b);
}

export interface OutputShapeOptions {
  /**
   * Angle channels are taken relative to this angle channel (as an estimator that analyses angle
   * differences sees them); null: absolute bus angles. Default null.
   */
  angleReference?: string | null;
  /** Channel whose angle is 0 in the result. Default: the channel with the largest magnitude. */
  reference?: string;
}

/**
 * A mode's shape as seen in the given output channels: the complex modal component c·v of each
 * channel's signal (angle channels optionally relative to `angleReference`), magnitudes relative
 * to the largest (= 1), angles relative to `reference`. Mixed units (deg, Hz, MW) are compared as
 * they are, as in a shape estimated from raw channels.
 */
export function modeOutputShape(model: TarrowModel, mode: TrueMode, channels: string[], options: OutputShapeOptions = {}): ShapeEntry[] {
  const row = (name: string): number[] => {
    const o = model.outputs.find((x) => x.channel === name);
    if (!o) throw new ModalInputError(`Unknown channel ${name}`);
    return o.c;
  };
  const refRow = options.angleReference ? row(options.angleReference) : null;
  const comps = channels.map((name) => {
    const c = row(name);
    const isAngle = model.outputs.find((x) => x.channel === name)!.kind === 'angle';
    let re = 0;
    let im = 0;
    for (let j = 0; j < c.length; j++) {
      const cj = c[j] - (isAngle && refRow ? refRow[j] : 0);
      re += cj * mode.eigenvector.re[j];
      im += cj * mode.eigenvector.im[j];
    }
    return { re, im };
  });
  const mags = comps.map((z) => Math.hypot(z.re, z.im));
  const maxMag = Math.max(...mags);
  let refIdx = mags.indexOf(maxMag);
  if (options.reference !== undefined) {
    refIdx = channels.indexOf(options.reference);
    if (refIdx < 0) throw new ModalInputError(`reference ${options.reference} is not one of the channels`);
  }
  const refPhase = Math.atan2(comps[refIdx].im, comps[refIdx].re);
  return channels.map((channel, k) => ({
    channel,
    magnitude: maxMag > 0 ? mags[k] / maxMag : 0,
    angleDeg: wrap180(((Math.atan2(comps[k].im, comps[k].re) - refPhase) * 180) / Math.PI),
  }));
}
