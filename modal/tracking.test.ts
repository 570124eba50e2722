import { describe, expect, it } from 'vitest';
import { TARROW_TRACKS } from '../fixtures/tarrow-network';
import { ModalInputError } from './errors';
import { assignTracks, groupReferenceShape, mac, trackSpecOf, type ModeTrackSpec } from './tracking';
import type { AmbientMode, ShapeEntry } from './types';

const shape = (pairs: [string, number, number][]): ShapeEntry[] => pairs.map(([channel, magnitude, angleDeg]) => ({ channel, magnitude, angleDeg }));

function mode(f: number, d: number, sh: ShapeEntry[], extra: Partial<AmbientMode> = {}): AmbientMode {
  const omega = 2 * Math.PI * f;
  return {
    frequencyHz: f,
    dampingRatio: d / 100,
    dampingPercent: d,
    sigma: -(d / 100) * omega,
    omega,
    dampingCi: [d - 1, d + 1],
    frequencyCi: [f - 0.01, f + 0.01],
    confidenceLevel: 0.9,
    forced: false,
    shape: sh,
    strength: 10,
    ...extra,
  };
}

describe('mac (paper: Allemang & Brown 1982, modal assurance criterion)', () => {
  it('is 1 for the same shape up to a complex scale and 0 for orthogonal shapes', () => {
    const a = [
      { re: 1, im: 0 },
      { re: 0, im: 2 },
      { re: -1, im: 1 },
    ];
    const scaled = a.map((z) => ({ re: 3 * (z.re * Math.cos(0.7) - z.im * Math.sin(0.7)), im: 3 * (z.re * Math.sin(0.7) + z.im * Math.cos(0.7)) }));
    expect(mac(a, scaled)).toBeCloseTo(1, 14);
    expect(mac([{ re: 1, im: 0 }, { re: 0, im: 0 }], [{ re: 0, im: 0 }, { re: 0, im: 5 }])).toBe(0);
    // |aᴴb|²/(|a|²|b|²) for a = (1, 1), b = (1, 0): 1/2
    expect(mac([{ re: 1, im: 0 }, { re: 1, im: 0 }], [{ re: 1, im: 0 }, { re: 0, im: 0 }])).toBeCloseTo(0.5, 14);
  });

  it('matches shape entries by channel and can restrict the channels', () => {
    const a = shape([['x', 1, 0], ['y', 0.5, 180], ['z', 1, 90]]);
    const b = shape([['y', 1, 0], ['x', 2, 180], ['w', 1, 0]]);
    expect(mac(a, b)).toBeCloseTo(1, 12); // x and y: (1, −0.5) against (−2, 1)
    expect(mac(a, shape([['z', 1, 0], ['x', 1, 0]]), ['x'])).toBeCloseTo(1, 12);
    expect(mac(a, shape([['q', 1, 0]]))).toBe(0);
  });

  it('refuses mixed or unequal inputs', () => {
    expect(() => mac([{ re: 1, im: 0 }], [{ re: 1, im: 0 }, { re: 1, im: 0 }])).toThrow(
      new ModalInputError('mac: the vectors differ in length (1 and 2)'),
    );
    expect(() => mac(shape([['x', 1, 0]]), [{ re: 1, im: 0 }])).toThrow(
      new ModalInputError('mac: compare two mode shapes or two complex vectors, not one of each'),
    );
  });
});

describe('assignTracks', () => {
  const channels = ['greyscar.angle', 'moorgate.angle', 'saltreach-bay.angle', 'gullhaven.angle', 'eastfell-ridge.angle', 'windlow.angle'];
  const tracks = TARROW_TRACKS.map((t) => trackSpecOf(t, channels));
  const ns = shape([
    ['greyscar.angle', 1, 0],
    ['moorgate.angle', 0.8, -3],
    ['saltreach-bay.angle', 0.6, 178],
    ['gullhaven.angle', 0.7, 175],
    ['eastfell-ridge.angle', 0.1, 90],
    ['windlow.angle', 0.1, 95],
  ]);
  const ew = shape([
    ['greyscar.angle', 0.3, 180],
    ['moorgate.angle', 0.3, 178],
    ['saltreach-bay.angle', 0.2, 175],
    ['gullhaven.angle', 0.2, 170],
    ['eastfell-ridge.angle', 1, 0],
    ['windlow.angle', 0.9, 3],
  ]);

  it('builds the reference shape from the track site groups (group A at 0°, group B at 180°)', () => {
    expect(groupReferenceShape(TARROW_TRACKS[0], channels)).toEqual(
      shape([
        ['greyscar.angle', 1, 0],
        ['moorgate.angle', 1, 0],
        ['saltreach-bay.angle', 1, 180],
        ['gullhaven.angle', 1, 180],
      ]),
    );
  });

  it('assigns by band and shape, skipping forced peaks and estimates of a different shape', () => {
    const modes = [
      mode(0.33, 2.5, ns),
      mode(0.44, 9, ew), // in the north–south band but swinging east against west: not north–south
      mode(0.5, 0, ns, { forced: true, strength: 50 }),
      mode(0.57, 7, ew),
      mode(1.3, 10, shape([['greyscar.angle', 1, 0], ['moorgate.angle', 0.3, 180]])),
    ];
    const res = assignTracks(modes, tracks);
    const by = Object.fromEntries(res.assignments.map((a) => [a.track, a]));
    expect(by['north-south'].modeIndex).toBe(0);
    expect(by['north-south'].mac).toBeGreaterThan(0.9);
    expect(by['east-west'].modeIndex).toBe(3);
    expect(by['east-west'].forcedInBand).toEqual([2]);
    expect(by['greyscar'].modeIndex).toBe(4);
    expect(res.unassigned).toEqual([1]);
  });

  it('without a reference shape takes the strongest estimate in band', () => {
    const t: ModeTrackSpec[] = [{ code: 'any', minHz: 0.2, maxHz: 0.8 }];
    const res = assignTracks([mode(0.3, 3, ns, { strength: 4 }), mode(0.6, 7, ew, { strength: 9 })], t);
    expect(res.assignments[0]).toEqual({ track: 'any', modeIndex: 1, mac: null, forcedInBand: [] });
  });

  it('refuses bad tracks', () => {
    expect(() => assignTracks([], [{ code: 'a', minHz: 1, maxHz: 0.5 }])).toThrow(
      new ModalInputError("mode track 'a': the band must satisfy 0 ≤ minHz < maxHz, got 1–0.5 Hz"),
    );
    expect(() => assignTracks([], [{ code: 'a', minHz: 0, maxHz: 1 }, { code: 'a', minHz: 1, maxHz: 2 }])).toThrow(
      new ModalInputError("mode track 'a' is listed twice"),
    );
    expect(() => assignTracks([], [{ code: 'a', minHz: 0, maxHz: 1, minMac: 2 }])).toThrow(
      new ModalInputError("mode track 'a': minMac must lie between 0 and 1, got 2"),
    );
  });
});
