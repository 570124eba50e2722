import { describe, expect, it } from 'vitest';
import type { SampledRecord } from '../types';
import { parseCsv, parseCsvRecord, writeCsv } from './csv';
import { FormatError } from './errors';

const T0 = 1735689600; // 2025-01-01T00:00:00Z

/** A small record from known parameters: a 0.3 Hz damped cosine, a ramp, a constant frequency. */
function knownRecord(rate: number, seconds: number): SampledRecord {
  const n = Math.round(rate * seconds);
  const t = (i: number) => i / rate;
  return {
    startTime: T0,
    rate,
    channels: [
      { name: 'moorgate.angle', values: Float64Array.from({ length: n }, (_, i) => 12.5 * Math.exp(-0.05 * t(i)) * Math.cos(2 * Math.PI * 0.3 * t(i))) },
      { name: 'moorgate.mw', values: Float64Array.from({ length: n }, (_, i) => 2400 + 3.25 * t(i)) },
      { name: 'moorgate.freq', values: Float64Array.from({ length: n }, () => 59.998765) },
    ],
  };
}

function expectClose(a: SampledRecord, b: SampledRecord, tol: number) {
  expect(b.rate).toBe(a.rate);
  expect(b.channels.map((c) => c.name)).toEqual(a.channels.map((c) => c.name));
  a.channels.forEach((c, k) => {
    expect(b.channels[k].values.length).toBe(c.values.length);
    c.values.forEach((v, i) => {
      if (Number.isNaN(v)) expect(b.channels[k].values[i]).toBeNaN();
      else expect(Math.abs(b.channels[k].values[i] - v)).toBeLessThanOrEqual(tol);
    });
  });
}

/** CSV text from rows of [time, ...values] strings. */
const csv = (header: string, rows: (string | number)[][]) => [header, ...rows.map((r) => r.join(','))].join('\n') + '\n';
const epochRows = (n: number, rate: number, from = 0) => Array.from({ length: n }, (_, i) => [String(Number((T0 + (i + from) / rate).toFixed(6))), (1 + i).toFixed(2)]);

function message(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(FormatError);
    return (e as Error).message;
  }
  throw new Error('expected a FormatError');
}

describe('writeCsv → parseCsvRecord round trip', () => {
  it('keeps times, rate and values with epoch-second times (6 decimals)', () => {
    const rec = knownRecord(30, 4);
    const text = writeCsv(rec);
    expect(text.split('\n')[0]).toBe('time,moorgate.angle,moorgate.mw,moorgate.freq');
    expect(text.split('\n')[2].startsWith('1735689600.033333,')).toBe(true);
    const back = parseCsvRecord(text);
    expect(back.startTime).toBe(T0);
    expectClose(rec, back, 5e-7);
  });

  it('keeps them with ISO-8601 UTC times rounded to the millisecond, at 30 and 60 frames/s', () => {
    for (const rate of [30, 60]) {
      const rec = knownRecord(rate, 2);
      const text = writeCsv(rec, { time: 'iso' });
      expect(text.split('\n')[2].startsWith(rate === 30 ? '2025-01-01T00:00:00.033Z,' : '2025-01-01T00:00:00.017Z,')).toBe(true);
      const parsed = parseCsv(text);
      expect(parsed.report.timeFormat).toBe('iso');
      expect(parsed.record.startTime).toBe(T0);
      expectClose(rec, parsed.record, 5e-7);
    }
  });

  it('writes NaN as an empty field and reads it back as a counted dropout', () => {
    const rec = knownRecord(10, 2);
    rec.channels[1].values[3] = NaN;
    rec.channels[1].values[4] = NaN;
    const parsed = parseCsv(writeCsv(rec));
    expect(parsed.report.dropouts).toEqual({ 'moorgate.angle': 0, 'moorgate.mw': 2, 'moorgate.freq': 0 });
    expectClose(rec, parsed.record, 5e-7);
  });
});

describe('parseCsv: rows, gaps, rates', () => {
  it('fills missing frames with NaN and counts the gaps', () => {
    const rows = epochRows(20, 10).filter((_, i) => i !== 5 && i !== 6 && i !== 12);
    const parsed = parseCsv(csv('time,a', rows));
    expect(parsed.report).toMatchObject({ rows: 17, frames: 20, rate: 10, gaps: 2, missingFrames: 3 });
    const a = parsed.record.channels[0].values;
    expect(a[5]).toBeNaN();
    expect(a[6]).toBeNaN();
    expect(a[12]).toBeNaN();
    expect(a[7]).toBe(8);
  });

  it('accepts every IEEE C37.118.1 reporting rate of its system and reads NaN fields as dropouts (standard)', () => {
    for (const rate of [10, 12, 15, 20, 30, 60]) expect(parseCsv(csv('time,a', epochRows(30, rate))).record.rate).toBe(rate);
    for (const rate of [10, 25, 50]) expect(parseCsv(csv('time,a', epochRows(30, rate)), { nominalHz: 50 }).record.rate).toBe(rate);
    const rows = epochRows(5, 30);
    rows[2][1] = 'NaN';
    expect(parseCsv(csv('time,a', rows)).record.channels[0].values[2]).toBeNaN();
  });

  it('reads quoted fields, a byte-order mark, CRLF line ends and blank lines (csv-parse)', () => {
    const text = '\uFEFFtime,"kestrel-falls.angle"\r\n1735689600,"1.5"\r\n\r\n1735689600.1,2.5\r\n';
    const rec = parseCsvRecord(text);
    expect(rec.channels[0].name).toBe('kestrel-falls.angle');
    expect(Array.from(rec.channels[0].values)).toEqual([1.5, 2.5]);
  });
});

describe('parseCsv: refusals name the line and the reason', () => {
  it('duplicate timestamp', () => {
    const rows = Array.from({ length: 20 }, (_, i) => [String(Number((T0 + (i + 1) / 30).toFixed(6))), '1']);
    rows[15][0] = rows[14][0]; // line 17 repeats line 16's time
    expect(message(() => parseCsvRecord(csv('time,a', rows)))).toBe(
      "line 17: time 1735689600.5 is not after the previous row's 1735689600.5 (duplicate timestamp)",
    );
  });

  it('timestamps going backwards', () => {
    const rows = epochRows(10, 10);
    [rows[3][0], rows[4][0]] = [rows[4][0], rows[3][0]];
    expect(message(() => parseCsvRecord(csv('time,a', rows)))).toBe(
      "line 6: time 1735689600.3 is before the previous row's 1735689600.4 (timestamps must increase)",
    );
  });

  it('a value that is not a number', () => {
    const rows = epochRows(10, 10);
    rows[6][1] = '12.5kV';
    expect(message(() => parseCsvRecord(csv('time,moorgate.mw', rows)))).toBe('line 8: value "12.5kV" in column moorgate.mw is not a number');
  });

  it('a row with too few fields', () => {
    const rows: (string | number)[][] = epochRows(10, 10).map((r) => [...r, '3']);
    rows[2] = rows[2].slice(0, 2);
    expect(message(() => parseCsvRecord(csv('time,a,b', rows)))).toBe('line 4: expected 3 fields (time and 2 channels), found 2');
  });

  it('a rate that is not a standard reporting rate', () => {
    expect(message(() => parseCsvRecord(csv('time,a', epochRows(10, 25))))).toBe(
      'the rows are 0.04 s apart (25 frames/s), not a standard reporting rate for a 60 Hz system (IEEE C37.118.1: 10, 12, 15, 20, 30, 60 frames/s)',
    );
    expect(message(() => parseCsvRecord(csv('time,a', epochRows(10, 32))))).toBe(
      'the rows are 0.03125 s apart (32 frames/s), not a standard reporting rate for a 60 Hz system (IEEE C37.118.1: 10, 12, 15, 20, 30, 60 frames/s)',
    );
  });

  it('a row off the frame grid', () => {
    const rows = epochRows(10, 10);
    rows[5][0] = String(T0 + 0.55);
    expect(message(() => parseCsvRecord(csv('time,a', rows)))).toBe('line 7: time 1735689600.55 is off the 10 frames/s grid by 50 ms');
  });

  it('header problems', () => {
    expect(message(() => parseCsvRecord(csv('timestamp,a', epochRows(3, 10))))).toBe('line 1: the first column must be "time", found "timestamp"');
    expect(message(() => parseCsvRecord(csv('time,a,a', epochRows(3, 10).map((r) => [...r, '1']))))).toBe('line 1: channel "a" appears twice (columns 2 and 3)');
    expect(message(() => parseCsvRecord(csv('time,,b', epochRows(3, 10).map((r) => [...r, '1']))))).toBe('line 1: column 2 has no channel name');
    expect(message(() => parseCsvRecord('time\n1,\n'))).toBe('line 1: the header names no channel after "time"');
  });

  it('time stamps that are not UTC or mix formats', () => {
    expect(message(() => parseCsvRecord(csv('time,a', [['2025-01-01T00:00:00.000+01:00', 1], ['2025-01-01T00:00:00.100+01:00', 2]])))).toBe(
      'line 2: time "2025-01-01T00:00:00.000+01:00" is not UTC (offset +01:00); write UTC times with a trailing Z',
    );
    expect(message(() => parseCsvRecord(csv('time,a', [['2025-01-01T00:00:00.000', 1]])))).toBe(
      'line 2: time "2025-01-01T00:00:00.000" has no time zone; write UTC times with a trailing Z',
    );
    expect(message(() => parseCsvRecord(csv('time,a', [['2025-02-30T00:00:00Z', 1]])))).toBe('line 2: time "2025-02-30T00:00:00Z" is not a valid calendar date and time');
    expect(message(() => parseCsvRecord(csv('time,a', [['2025-01-01T00:00:00.000Z', 1], [String(T0 + 0.1), 2]])))).toBe(
      'line 3: time "1735689600.1" is epoch seconds but earlier rows use ISO-8601 times',
    );
    expect(message(() => parseCsvRecord(csv('time,a', [['yesterday', 1]])))).toBe(
      'line 2: time "yesterday" is not an ISO-8601 time (YYYY-MM-DDThh:mm:ss.sssZ) or epoch seconds',
    );
  });

  it('empty files, header-only files, one row, a long gap, broken quoting', () => {
    expect(message(() => parseCsvRecord(''))).toBe('The file is empty: expected a header row `time,<channel>,…` and data rows');
    expect(message(() => parseCsvRecord('time,a\n'))).toBe('The file has a header but no data rows');
    expect(message(() => parseCsvRecord('time,a\n1735689600,1\n'))).toBe('The file has one data row; at least two are needed to find the reporting rate');
    const rows = epochRows(5, 10);
    rows.push([String(T0 + 4000), '9']);
    expect(message(() => parseCsvRecord(csv('time,a', rows)))).toBe(
      "line 7: time 1735693600 is 3999.6 s after the previous row; gaps longer than 3600 s are refused",
    );
    const err = (() => {
      try {
        parseCsvRecord('time,a\n1735689600,1\n1735689600.1,"2\n');
      } catch (e) {
        return e as FormatError;
      }
    })()!;
    expect(err.line).toBe(3);
    expect(err.message.startsWith('line 3: the file is not valid CSV (Quote Not Closed')).toBe(true);
  });
});
