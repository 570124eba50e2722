import { describe, expect, it } from 'vitest';
import { buildTarrowModel, simulateRingdown } from '../simulator';
import type { SampledRecord } from '../types';
import { comtradeTime, parseCff, parseComtrade, parseComtradeCfg, parseComtradeDetailed, writeCff, writeComtrade } from './comtrade';
import { FormatError } from './errors';

const sim = simulateRingdown(buildTarrowModel(1500), { event: 'line-trip', seconds: 10, preEventSeconds: 2, seed: 4, startTime: 1735689600.25 });
const rec = sim.record;

function maxErr(a: SampledRecord, b: SampledRecord, k: number): number {
  let e = 0;
  a.channels[k].values.forEach((v, i) => (e = Math.max(e, Math.abs(b.channels[k].values[i] - v))));
  return e;
}

function message(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(FormatError);
    return (e as Error).message;
  }
  throw new Error('expected a FormatError');
}

const enc = (s: string) => new TextEncoder().encode(s);

// A hand-made 1999-revision file: two analog channels (one on secondary values), one digital
// channel, a missing sample (99999), no time multiplier line.
const CFG_1999 = [
  'Saltreach Bay PMU,7,1999',
  '3,2A,1D',
  '1,saltreach-bay.angle,,saltreach-bay,deg,0.01,-5,0,-99999,99998,1,1,P',
  '2,saltreach-bay.mw,,saltreach-bay,MW,0.5,0,0,-99999,99998,1000,1,S',
  '1,breaker,,saltreach-bay,0',
  '60',
  '1',
  '30,3',
  '02/03/2025,10:20:30.500000',
  '02/03/2025,10:20:31.000000',
  'ASCII',
].join('\n');
const DAT_1999 = ['1,0,100,4,0', '2,33333,250,99999,1', '3,66667,-300,6,0'].join('\n');

describe('writeComtrade → parseComtrade round trip', () => {
  it('ASCII: keeps names, rate, start time and values within half a raw step (value = a·raw + b, standard)', () => {
    const files = writeComtrade(rec, { triggerTime: sim.eventTime });
    const parsed = parseComtradeDetailed(files.cfg, files.dat);
    expect(parsed.record.rate).toBe(30);
    expect(parsed.record.startTime).toBeCloseTo(1735689600.25, 6);
    expect(parsed.header.triggerTime).toBeCloseTo(sim.eventTime, 6);
    expect(parsed.record.channels.map((c) => c.name)).toEqual(rec.channels.map((c) => c.name));
    parsed.header.analog.forEach((c, k) => expect(maxErr(rec, parsed.record, k)).toBeLessThanOrEqual(0.5 * c.a * (1 + 1e-9)));
    expect(parsed.header.analog.find((c) => c.name === 'moorgate.mw')!.unit).toBe('MW');
  });

  it('BINARY (int16): keeps them within half a raw step too', () => {
    const files = writeComtrade(rec, { fileType: 'BINARY' });
    expect(files.dat.length).toBe(rec.channels[0].values.length * (8 + 2 * rec.channels.length));
    const parsed = parseComtradeDetailed(files.cfg, files.dat);
    expect(parsed.header.fileType).toBe('BINARY');
    parsed.header.analog.forEach((c, k) => expect(maxErr(rec, parsed.record, k)).toBeLessThanOrEqual(0.5 * c.a * (1 + 1e-9)));
  });

  it('writes missing samples as the missing-data codes and reads them back as NaN', () => {
    const r: SampledRecord = { startTime: 1735689600, rate: 10, channels: [{ name: 'millbrook.freq', values: Float64Array.from([60, NaN, 60.01, 59.99]) }] };
    for (const fileType of ['ASCII', 'BINARY'] as const) {
      const f = writeComtrade(r, { fileType });
      if (fileType === 'ASCII') expect(new TextDecoder().decode(f.dat).split('\r\n')[1]).toBe('2,100000,99999');
      const p = parseComtradeDetailed(f.cfg, f.dat);
      expect(p.record.channels[0].values[1]).toBeNaN();
      expect(p.dropouts['millbrook.freq']).toBe(1);
    }
  });

  it('writes the 2013 .cfg layout: station line, channel counts, analog lines, rate, times, file type, time multiplier', () => {
    const files = writeComtrade(rec);
    const lines = files.cfg.split('\r\n');
    const nA = rec.channels.length;
    expect(lines[0]).toBe('Tarrow Interconnection,keel,2013');
    expect(lines[1]).toBe(`${nA},${nA}A,0D`);
    expect(lines[2].startsWith('1,greyscar.angle,,greyscar,deg,')).toBe(true);
    expect(lines[2].endsWith(',0,-99998,99998,1,1,P')).toBe(true);
    expect(lines.slice(2 + nA, 2 + nA + 10)).toEqual(['60', '1', `30,${rec.channels[0].values.length}`, '01/01/2025,00:00:00.250000', '01/01/2025,00:00:00.250000', 'ASCII', '1', '0,0', '0,0', '']);
    expect(comtradeTime(1735689600.0333333)).toBe('01/01/2025,00:00:00.033333');
  });

  it('single-file .cff: text with ASCII data round-trips', () => {
    const text = writeCff(rec);
    expect(text.startsWith('--- file type: CFG ---\r\n')).toBe(true);
    const back = parseCff(text);
    expect(back.channels.length).toBe(rec.channels.length);
    expect(maxErr(rec, back, 3)).toBeLessThan(1e-3);
  });
});

describe('parseComtrade: files written by others', () => {
  it('reads a 1999 file with secondary values, a digital channel and a missing sample (standard: value = a·raw + b, × primary/secondary for S)', () => {
    const p = parseComtradeDetailed(CFG_1999, enc(DAT_1999));
    expect(p.header.revYear).toBe('1999');
    expect(p.header.timemult).toBe(1);
    expect(p.record.startTime).toBe(Date.UTC(2025, 2, 2, 10, 20, 30) / 1000 + 0.5);
    expect(Array.from(p.record.channels[0].values)).toEqual([0.01 * 100 - 5, 0.01 * 250 - 5, 0.01 * -300 - 5]);
    const mw = p.record.channels[1].values;
    expect(mw[0]).toBe(0.5 * 4 * 1000);
    expect(mw[1]).toBeNaN();
    expect(mw[2]).toBe(0.5 * 6 * 1000);
  });

  it('reads BINARY with a digital status word, BINARY32 and FLOAT32 sample layouts (standard)', () => {
    const cfg = (ft: string, digital: boolean) =>
      [`X,1,2013`, digital ? '2,1A,1D' : '1,1A,0D', '1,gullhaven.freq,,gullhaven,Hz,0.001,60,0,-32767,32767,1,1,P', ...(digital ? ['1,trip,,gullhaven,0'] : []), '60', '1', '10,2', '01/01/2025,00:00:00.000000', '01/01/2025,00:00:00.000000', ft, '1'].join('\n');
    // BINARY with one digital channel: n (u32), time stamp (u32), analog (i16), status word (u16).
    const rows16 = new Uint8Array(2 * 12);
    let v = new DataView(rows16.buffer);
    v.setUint32(0, 1, true); v.setUint32(4, 0, true); v.setInt16(8, 12, true); v.setUint16(10, 1, true);
    v.setUint32(12, 2, true); v.setUint32(16, 100000, true); v.setInt16(20, -32768, true); v.setUint16(22, 0, true);
    const r16 = parseComtrade(cfg('BINARY', true), rows16);
    expect(r16.channels[0].values[0]).toBeCloseTo(60.012, 12);
    expect(r16.channels[0].values[1]).toBeNaN();
    const rows32 = new Uint8Array(2 * 12);
    v = new DataView(rows32.buffer);
    v.setUint32(0, 1, true); v.setInt32(8, -25, true);
    v.setUint32(12, 2, true); v.setInt32(20, 40000, true);
    expect(Array.from(parseComtrade(cfg('BINARY32', false), rows32).channels[0].values)).toEqual([0.001 * -25 + 60, 0.001 * 40000 + 60]);
    const rowsF = new Uint8Array(2 * 12);
    v = new DataView(rowsF.buffer);
    v.setUint32(0, 1, true); v.setFloat32(8, 1.5, true);
    v.setUint32(12, 2, true); v.setFloat32(20, -2.25, true);
    expect(Array.from(parseComtrade(cfg('FLOAT32', false), rowsF).channels[0].values)).toEqual([0.001 * 1.5 + 60, 0.001 * -2.25 + 60]);
  });

  it('reads a .cff with binary data from its bytes', () => {
    const files = writeComtrade(rec, { fileType: 'BINARY' });
    const head = enc(`--- file type: CFG ---\r\n${files.cfg}--- file type: HDR ---\r\nline trip study\r\n--- file type: DAT BINARY: ${files.dat.length} ---\r\n`);
    const all = new Uint8Array(head.length + files.dat.length);
    all.set(head);
    all.set(files.dat, head.length);
    const back = parseCff(all);
    expect(back.channels[0].values.length).toBe(rec.channels[0].values.length);
    expect(message(() => parseCff(new TextDecoder('latin1').decode(all)))).toBe("cff: the data section is BINARY; pass the file's bytes, not text");
  });
});

describe('parseComtrade: refusals name the file, the line and the reason', () => {
  const good = writeComtrade({ startTime: 1735689600, rate: 30, channels: [{ name: 'windlow.angle', values: Float64Array.from([1, 2, 3]) }] });
  const cfgLines = good.cfg.split('\r\n');
  const withLine = (i: number, text: string) => cfgLines.map((l, k) => (k === i ? text : l)).join('\r\n');

  it('bad channel counts, dates, file types and rates in the .cfg', () => {
    expect(message(() => parseComtradeCfg(withLine(1, '1,1,0D')))).toBe('cfg line 2: expected channel counts like 22,22A,0D, found "1,1,0D"');
    expect(message(() => parseComtradeCfg(withLine(1, '2,1A,0D')))).toBe('cfg line 2: total channels 2 is not 1A + 0D');
    expect(message(() => parseComtradeCfg(withLine(6, '2025-01-01,00:00:00')))).toBe('cfg line 7: first sample time "2025-01-01,00:00:00" is not dd/mm/yyyy,hh:mm:ss.ssssss');
    expect(message(() => parseComtradeCfg(withLine(8, 'EBCDIC')))).toBe('cfg line 9: file type "EBCDIC" is not ASCII, BINARY, BINARY32 or FLOAT32');
    expect(message(() => parseComtradeCfg(withLine(4, '2')))).toBe('cfg line 5: the file has 2 sampling rates; Keel needs one uniform rate');
    expect(message(() => parseComtradeCfg(withLine(2, '1,windlow.angle,,windlow,deg,x,0,0,-1,1,1,1,P')))).toBe('cfg line 3: multiplier a of windlow.angle "x" is not a number');
    expect(message(() => parseComtradeCfg(cfgLines.slice(0, 5).join('\n')))).toBe('the .cfg ends early: the sampling rate line is missing');
    expect(message(() => parseComtrade(withLine(5, '960,3'), good.dat))).toBe(
      'cfg: sampling rate 960 samples/s is not a standard reporting rate for a 60 Hz system (IEEE C37.118.1: 10, 12, 15, 20, 30, 60 frames/s)',
    );
    expect(parseComtrade(withLine(5, '960,3'), good.dat, { requireStandardRate: false }).rate).toBe(960);
  });

  it('a .dat that does not match its .cfg', () => {
    expect(message(() => parseComtrade(withLine(5, '30,4'), good.dat))).toBe('dat: the .cfg announces 4 samples, the .dat holds 3 rows');
    const badDat = enc('1,0,5\r\n2,33333,abc\r\n3,66667,7\r\n');
    expect(message(() => parseComtrade(good.cfg, badDat))).toBe('dat line 2: value "abc" of channel windlow.angle is not a number');
    expect(message(() => parseComtrade(good.cfg, enc('1,0,5\r\n1,33333,6\r\n3,66667,7\r\n')))).toBe('dat line 2: sample number 1 does not increase (previous 1)');
    expect(message(() => parseComtrade(good.cfg, enc('1,0\r\n2,33333,6\r\n3,66667,7\r\n')))).toBe('dat line 1: expected 3 fields (sample number, time stamp, 1 analog), found 2');
    const bin = writeComtrade({ startTime: 1735689600, rate: 30, channels: [{ name: 'windlow.angle', values: Float64Array.from([1, 2, 3]) }] }, { fileType: 'BINARY' });
    expect(message(() => parseComtrade(bin.cfg, bin.dat.subarray(0, 29)))).toBe('dat: a BINARY file of 3 samples × 10 bytes should hold 30 bytes, found 29');
  });
});
