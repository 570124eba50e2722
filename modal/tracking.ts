// Assignment of ambient estimates to configured mode tracks, so a trend follows one physical mode.
// A track has a frequency band and, optionally, a reference shape — the expected swing pattern
// (built from the track's two groups of sites) or the track's latest accepted estimate. Estimates
// are matched by frequency band first and mode-shape similarity (MAC) second.
import type { TarrowTrack } from '../fixtures/tarrow-network';
import { ModalInputError } from './errors';
import type { Complex } from './linalg';
import type { AmbientMode, ShapeEntry } from './types';

function toComplex(e: ShapeEntry): Complex {
  const a = (e.angleDeg * Math.PI) / 180;
  return { re: e.magnitude * Math.cos(a), im: e.magnitude * Math.sin(a) };
}

/**
 * Modal assurance criterion |aᴴb|² / ((aᴴa)(bᴴb)) (paper: Allemang & Brown 1982), 0…1, invariant
 * to a complex scale of either vector. Shapes are matched by channel name over the channels both
 * have (and, if given, only those in `channels`); complex vectors must have equal length.
 * 0 when either vector is zero on the common channels.
 */
export function mac(a: ShapeEntry[] | Complex[], b: ShapeEntry[] | Complex[], channels?: string[]): number {
  let va: Complex[];
  let vb: Complex[];
  const isShape = (v: ShapeEntry[] | Complex[]): v is ShapeEntry[] => v.length > 0 && 'channel' in (v[0] as object);
  if (isShape(a) || isShape(b)) {
    if (!(isShape(a) || a.length === 0) || !(isShape(b) || b.length === 0)) {
      throw new ModalInputError('mac: compare two mode shapes or two complex vectors, not one of each');
    }
    const sa = a as ShapeEntry[];
    const mb = new Map((b as ShapeEntry[]).map((e) => [e.channel, e]));
    const keep = channels ? new Set(channels) : null;
    va = [];
    vb = [];
    for (const e of sa) {
      const f = mb.get(e.channel);
      if (!f || (keep && !keep.has(e.channel))) continue;
      va.push(toComplex(e));
      vb.push(toComplex(f));
    }
  } else {
    if (a.length !== b.length) throw new ModalInputError(`mac: the vectors differ in length (${a.length} and ${b.length})`);
    va = a as Complex[];
    vb = b as Complex[];
  }
  let dr = 0;
  let di = 0;
  let na = 0;
  let nb = 0;
  for (let i = 0; i < va.length; i++) {
    const x = va[i];
    const y = vb[i];
    for (const v of [x.re, x.im, y.re, y.im]) {
      if (!Number.isFinite(v)) throw new ModalInputError(`mac: entry ${i} is not a finite number`);
    }
    // conj(x)·y
    dr += x.re * y.re + x.im * y.im;
    di += x.re * y.im - x.im * y.re;
    na += x.re * x.re + x.im * x.im;
    nb += y.re * y.re + y.im * y.im;
  }
  if (!(na > 0) || !(nb > 0)) return 0;
  return Math.min(1, (dr * dr + di * di) / (na * nb));
}

/** A mode track as the assignment needs it. */
export interface ModeTrackSpec {
  code: string;
  /** Frequency band, Hz. */
  minHz: number;
  maxHz: number;
  /** Expected shape (or the track's latest estimate); null/absent: frequency band only. */
  referenceShape?: ShapeEntry[] | null;
  /** Least MAC with the reference shape for a match. Default 0.5. */
  minMac?: number;
}

export interface TrackAssignment {
  track: string;
  /** Index into `modes` of the assigned estimate, or null when none qualifies. */
  modeIndex: number | null;
  /** MAC of the assigned estimate with the reference shape (null without a reference). */
  mac: number | null;
  /** Indices of estimates in the band flagged as forced oscillations (never assigned). */
  forcedInBand: number[];
}

export interface TrackAssignmentResult {
  assignments: TrackAssignment[];
  /** Indices of natural (not forced) estimates no track took. */
  unassigned: number[];
}

function checkTracks(tracks: ModeTrackSpec[]): void {
  const codes = new Set<string>();
  for (const t of tracks) {
    if (typeof t.code !== 'string' || t.code === '') throw new ModalInputError('every mode track needs a code');
    if (codes.has(t.code)) throw new ModalInputError(`mode track '${t.code}' is listed twice`);
    codes.add(t.code);
    if (!(Number.isFinite(t.minHz) && Number.isFinite(t.maxHz) && t.minHz >= 0 && t.minHz < t.maxHz)) {
      throw new ModalInputError(`mode track '${t.code}': the band must satisfy 0 ≤ minHz < maxHz, got ${t.minHz}–${t.maxHz} Hz`);
    }
    const m = t.minMac ?? 0.5;
    if (!(m >= 0 && m <= 1)) throw new ModalInputError(`mode track '${t.code}': minMac must lie between 0 and 1, got ${m}`);
  }
}

/**
 * Assigns estimates to tracks, each estimate to at most one track and each track at most one
 * estimate. Candidates of a track: natural (not forced) estimates inside its band with, when the
 * track has a reference shape, MAC ≥ minMac. Pairs are taken greedily by MAC (highest first;
 * tracks without a reference count MAC as 0), ties broken by strength — so a shape match beats a
 * stronger peak of a different mode in an overlapping band.
 */
export function assignTracks(modes: AmbientMode[], tracks: ModeTrackSpec[]): TrackAssignmentResult {
  checkTracks(tracks);
  const pairs: { t: number; m: number; mac: number | null; key: number; strength: number }[] = [];
  const forced: number[][] = tracks.map(() => []);
  tracks.forEach((track, t) => {
    modes.forEach((mode, m) => {
      if (mode.frequencyHz < track.minHz || mode.frequencyHz > track.maxHz) return;
      if (mode.forced) {
        forced[t].push(m);
        return;
      }
      let score: number | null = null;
      if (track.referenceShape && track.referenceShape.length > 0) {
        score = mac(mode.shape, track.referenceShape);
        if (score < (track.minMac ?? 0.5)) return;
      }
      pairs.push({ t, m, mac: score, key: score ?? 0, strength: mode.strength });
    });
  });
  pairs.sort((p, q) => q.key - p.key || q.strength - p.strength);
  const trackTaken = new Map<number, { m: number; mac: number | null }>();
  const modeTaken = new Set<number>();
  for (const p of pairs) {
    if (trackTaken.has(p.t) || modeTaken.has(p.m)) continue;
    trackTaken.set(p.t, { m: p.m, mac: p.mac });
    modeTaken.add(p.m);
  }
  const assignments = tracks.map((track, t) => {
    const got = trackTaken.get(t);
    return { track: track.code, modeIndex: got ? got.m : null, mac: got ? got.mac : null, forcedInBand: forced[t] };
  });
  const unassigned: number[] = [];
  modes.forEach((mode, m) => {
    if (!mode.forced && !modeTaken.has(m)) unassigned.push(m);
  });
  return { assignments, unassigned };
}

/**
 * Reference shape of a Tarrow-style track from its two site groups: the angle channel of each
 * group-A site at 0°, of each group-B site at 180°, magnitude 1, limited to `channels` (e.g. the
 * analysed channels). Channel names follow the `<site>.angle` convention.
 */
export function groupReferenceShape(track: Pick<TarrowTrack, 'reference'>, channels: string[]): ShapeEntry[] {
  const have = new Set(channels);
  const out: ShapeEntry[] = [];
  for (const site of track.reference.groupA) {
    const ch = `${site}.angle`;
    if (have.has(ch)) out.push({ channel: ch, magnitude: 1, angleDeg: 0 });
  }
  for (const site of track.reference.groupB) {
    const ch = `${site}.angle`;
    if (have.has(ch)) out.push({ channel: ch, magnitude: 1, angleDeg: 180 });
  }
  return out;
}

/** ModeTrackSpec of a Tarrow track with its group reference shape over `channels`. */
export function trackSpecOf(track: TarrowTrack, channels: string[], minMac = 0.5): ModeTrackSpec {
  return { code: track.code, minHz: track.minHz, maxHz: track.maxHz, referenceShape: groupReferenceShape(track, channels), minMac };
}
