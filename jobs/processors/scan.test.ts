// Track assignment across the windows of a scan (ScanTracker) on hand-made modes, and the window
// count of a record against the estimator's own scan (modal/ambient.ts) on simulated data.
import { describe, expect, it } from 'vitest';
import { scanAmbient, checkAmbientOptions } from '../../modal/ambient';
import { buildTarrowModel, simulateAmbient } from '../../modal/simulator';
import type { AmbientMode, ShapeEntry } from '../../modal/types';
import { ScanTracker, windowCount } from './scan';

const TRACKS = [
  { code: 'north-south', minHz: 0.2, maxHz: 0.45 },
  { code: 'east-west', minHz: 0.45, maxHz: 0.85 },
];

function shape(angles: Record<string, number>): ShapeEntry[] {
  return Object.entries(angles).map(([channel, angleDeg]) => ({ channel, magnitude: 1, angleDeg }));
}
const A = shape({ 'a.angle': 0, 'b.angle': 0, 'c.angle': 180, 'd.angle': 180 });
const B = shape({ 'a.angle': 0, 'b.angle': 180, 'c.angle': 0, 'd.angle': 180 }); // orthogonal to A (MAC 0)

function mode(frequencyHz: number, strength: number, s: ShapeEntry[], forced = false): AmbientMode {
  return {
    frequencyHz,
    dampingRatio: 0.05,
    dampingPercent: 5,
    sigma: -0.1,
    omega: 2 * Math.PI * frequencyHz,
    dampingCi: [4, 6],
    frequencyCi: [frequencyHz - 0.01, frequencyHz + 0.01],
    confidenceLevel: 0.9,
    forced,
    shape: s,
    strength,
  };
}

describe('ScanTracker', () => {
  it('takes the strongest mode in the band in a track’s first window, ignoring peaks under 2 % of the strongest', () => {
    const t = new ScanTracker(TRACKS);
    const got = t.assign([mode(0.33, 1.0, A), mode(0.4, 0.3, B), mode(0.6, 0.015, B), mode(1.3, 0.5, A)]);
    expect(got.get(0)).toBe('north-south');
    expect(got.has(1)).toBe(false);
    expect(got.has(2)).toBe(false); // 1.5 % of the strongest: noise
    expect(got.has(3)).toBe(false); // outside every band
  });

  it('then follows the shape of the previous estimate rather than the strongest peak', () => {
    const t = new ScanTracker(TRACKS);
    t.assign([mode(0.33, 1.0, A)]);
    const got = t.assign([mode(0.35, 2.0, B), mode(0.33, 0.5, A)]);
    expect(got.get(1)).toBe('north-south');
    expect(got.has(0)).toBe(false);
  });

  it('leaves the track without an estimate when no candidate matches the previous shape', () => {
    const t = new ScanTracker(TRACKS);
    t.assign([mode(0.33, 1.0, A)]);
    expect(t.assign([mode(0.34, 1.0, B)]).size).toBe(0);
    // …and keeps following the old shape afterwards
    expect(t.assign([mode(0.33, 1.0, A)]).get(0)).toBe('north-south');
  });

  it('puts a forced peak in a band on that track, never as its natural estimate', () => {
    const t = new ScanTracker(TRACKS);
    const got = t.assign([mode(0.7, 5, A, true), mode(0.56, 1.0, B)]);
    expect(got.get(0)).toBe('east-west');
    expect(got.get(1)).toBe('east-west');
    // the forced peak's shape is not what the track follows next
    const next = t.assign([mode(0.56, 1.0, B), mode(0.6, 1.0, A)]);
    expect(next.get(0)).toBe('east-west');
  });
});

describe('windowCount', () => {
  it("matches the number of windows the estimator's own scan gives on a simulated record", () => {
    const record = simulateAmbient(buildTarrowModel(1000), { minutes: 25, seed: 3, channels: ['moorgate.angle', 'saltreach-bay.angle', 'tarrow-central.angle'] });
    const settings = { windowSeconds: 600, stepSeconds: 120 };
    const o = checkAmbientOptions(settings, { rate: record.rate, channelNames: record.channels.map((c) => c.name) });
    const n = record.channels[0].values.length;
    expect(windowCount(o, n)).toBe(scanAmbient(record, settings).length);
    expect(windowCount(o, n)).toBe(Math.floor((25 * 60 - 600) / 120) + 1); // 8 whole windows
  });
});
