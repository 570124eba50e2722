// Parser-level tests of the ingest pipeline on good files: CSV (epoch and ISO times), COMTRADE
// ASCII / BINARY / BINARY32 / FLOAT32 pairs and .cff files. Each file is written from known
// values by tests/fixtures-bad/make-files.ts, ingested into memory, and the stored frames are
// compared with the values written.
import fs from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import {
  comtradeAsciiDat,
  comtradeBinaryDat,
  comtradeCff,
  comtradeCfg,
  csvText,
  tarrowSeries,
  type Series,
} from '../../tests/fixtures-bad/make-files';
import { ingestToMemory, makeTmpDir, refusal, writeUpload } from '../../tests/fixtures-bad/harness';
import { writeCff, writeComtrade } from '../../modal/formats/comtrade';
import { writeCsv } from '../../modal/formats/csv';
import { UnmappedColumnsError } from './errors';

const dir = makeTmpDir();
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function expectSeries(got: Record<string, Float64Array>, s: Series, tol: number) {
  for (const [name, want] of Object.entries(s.channels)) {
    const g = got[name];
    expect(g, name).toBeDefined();
    expect(g.length).toBe(want.length);
    for (let i = 0; i < want.length; i++) {
      if (Number.isNaN(want[i])) expect(g[i], `${name}[${i}]`).toBeNaN();
      else expect(Math.abs(g[i] - want[i]), `${name}[${i}]`).toBeLessThanOrEqual(tol);
    }
  }
}

describe('CSV', () => {
  it('stores every value of a 30 frames/s file with epoch-second times, in chunks of the given size', async () => {
    const s = tarrowSeries(250);
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'moorgate.csv', content: csvText(s) }]), { chunkSize: 100 });
    expect(r.summary.rate).toBe(30);
    expect(r.summary.frames).toBe(250);
    expect(r.summary.rows).toBe(250);
    expect(r.summary.startTime).toBe(s.start);
    expect(r.summary.endTime).toBeCloseTo(s.start + 249 / 30, 9);
    expect(r.summary.gaps).toBe(0);
    // Values are parsed from their decimal text exactly (float64 storage).
    expectSeries(r.series, s, 0);
    // 3 channels × ceil(250 / 100) chunks; the last one is partial.
    expect(r.chunks).toHaveLength(9);
    const last = r.chunks.filter((c) => c.seq === 2);
    expect(last.every((c) => c.values.length === 50 && c.startSlot === 200)).toBe(true);
    expect(last[0].startTime).toBeCloseTo(s.start + 200 / 30, 9);
    for (const ch of r.summary.channels) {
      expect(ch.quality).toEqual({ samples: 250, dropouts: 0, gaps: 0, longestGap: 0, flatLine: 0, outliers: 0, duplicates: 0 });
    }
  });

  it('reads ISO-8601 UTC times with microseconds, Z or an offset, and CRLF line ends', async () => {
    const s = tarrowSeries(90, 60);
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'iso.csv', content: csvText(s, { time: 'iso', eol: '\r\n' }) }]));
    expect(r.summary.rate).toBe(60);
    expect(r.summary.startTime).toBe(s.start);
    expectSeries(r.series, s, 0);
    const withOffset = 'time,moorgate.freq\n2025-01-01T01:00:00.000+01:00,60.001\n2025-01-01T01:00:00.100+01:00,60.002\n';
    const r2 = await ingestToMemory(writeUpload(dir, [{ name: 'offset.csv', content: withOffset }]));
    expect(r2.summary.startTime).toBe(1_735_689_600);
    expect(r2.summary.rate).toBe(10);
  });

  it('finds 60 frames/s from times rounded to the millisecond (spacings 16 and 17 ms)', async () => {
    const rows = ['time,moorgate.freq'];
    for (let i = 0; i < 200; i++) rows.push(`${(1_735_689_600 + i / 60).toFixed(3)},60.0${i % 10}`);
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'ms.csv', content: rows.join('\n') }]));
    expect(r.summary.rate).toBe(60);
    expect(r.summary.frames).toBe(200);
  });

  it('skips a UTF-8 byte-order mark and accepts quoted cells', async () => {
    const text = '\uFEFF"time","moorgate.angle"\n"1735689600","12.5"\n1735689600.1,12.6\n1735689600.2,"12.7"\n';
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'bom.csv', content: text }]));
    expect(Array.from(r.series['moorgate.angle'])).toEqual([12.5, 12.6, 12.7]);
    expect(r.summary.rate).toBe(10);
  });

  it('keeps missing frames as NaN and counts gaps; empty cells are dropouts', async () => {
    const s = tarrowSeries(120);
    // Frames 40..44 missing (one gap of 5 frames), frame 80 missing (a second gap of 1).
    const drop = new Set([40, 41, 42, 43, 44, 80]);
    s.channels['moorgate.freq'][10] = NaN;
    s.channels['moorgate.freq'][11] = NaN;
    const lines = csvText(s).split('\n');
    const kept = lines.filter((_, i) => i === 0 || !drop.has(i - 1)).join('\n');
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'gaps.csv', content: kept }]));
    expect(r.summary.frames).toBe(120);
    expect(r.summary.rows).toBe(114);
    expect(r.summary.gaps).toBe(2);
    expect(r.summary.missingFrames).toBe(6);
    const want = structuredClone(s);
    for (const n of Object.keys(want.channels)) for (const i of drop) want.channels[n][i] = NaN;
    expectSeries(r.series, want, 0);
    const freq = r.summary.channels.find((c) => c.channel.name === 'moorgate.freq')!.quality;
    expect(freq).toMatchObject({ samples: 120, dropouts: 8, gaps: 3, longestGap: 5 });
    const angle = r.summary.channels.find((c) => c.channel.name === 'moorgate.angle')!.quality;
    expect(angle).toMatchObject({ samples: 120, dropouts: 6, gaps: 2, longestGap: 5 });
  });

  it('drops a row repeated verbatim and counts it as a duplicate', async () => {
    const s = tarrowSeries(60);
    const lines = csvText(s).trimEnd().split('\n');
    lines.splice(21, 0, lines[20]); // line 21 (frame 19) written twice
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'dup.csv', content: lines.join('\n') }]));
    expect(r.summary.rows).toBe(60);
    expect(r.summary.duplicates).toBe(1);
    expect(r.summary.channels.every((c) => c.quality.duplicates === 1)).toBe(true);
    expectSeries(r.series, s, 0);
  });

  it('counts flat lines (a frozen output for ≥ 1 s) and spikes (> 6 robust σ from the chunk median)', async () => {
    const s = tarrowSeries(300);
    const f = s.channels['moorgate.freq'];
    for (let i = 100; i < 145; i++) f[i] = 60.0005; // 45 equal samples = 1.5 s at 30 frames/s
    s.channels['moorgate.angle'][200] = 95; // a spike far outside ±0.9°
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'flat.csv', content: csvText(s) }]));
    const q = (n: string) => r.summary.channels.find((c) => c.channel.name === n)!.quality;
    expect(q('moorgate.freq').flatLine).toBe(45);
    expect(q('moorgate.freq').outliers).toBe(0);
    expect(q('moorgate.angle').outliers).toBe(1);
    expect(q('moorgate.angle').flatLine).toBe(0);
  });

  it('only stores mapped columns; a mapping sends an unknown column to a channel or ignores it', async () => {
    const text =
      'time,PMU7 Angle,moorgate.freq,spare\n' +
      Array.from({ length: 20 }, (_, i) => `${1_735_689_600 + i / 10},${i},60.0${i % 10},x`).join('\n');
    const files = () => writeUpload(dir, [{ name: 'pmu7.csv', content: text }]);
    await expect(ingestToMemory(files())).rejects.toThrow(UnmappedColumnsError);
    const err = await ingestToMemory(files()).catch((e: UnmappedColumnsError) => e);
    expect((err as UnmappedColumnsError).columns).toEqual(['PMU7 Angle', 'spare']);
    expect((err as UnmappedColumnsError).knownChannels).toContain('greyscar.angle');
    expect((err as Error).message).toBe(
      'line 1: columns "PMU7 Angle", "spare" match no channel of the network; re-send the upload with a mapping {column → channel name or "ignore"}',
    );
    // The text column 'spare' is ignored, so its cells are never read as numbers.
    const r = await ingestToMemory(files(), { mapping: { 'PMU7 Angle': 'greyscar.angle', spare: 'ignore' } });
    expect(r.summary.channels.map((c) => [c.columnName, c.channel.name])).toEqual([
      ['PMU7 Angle', 'greyscar.angle'],
      ['moorgate.freq', 'moorgate.freq'],
    ]);
    expect(Array.from(r.series['greyscar.angle']).slice(0, 3)).toEqual([0, 1, 2]);
  });

  it('matches a column differing from a channel name only in letter case', async () => {
    const text = 'Time,Moorgate.Freq\n1735689600,60\n1735689600.1,60.001\n';
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'case.csv', content: text }]));
    expect(r.summary.channels[0].channel.name).toBe('moorgate.freq');
  });

  it('refuses mappings that name a missing column, an unknown channel, or send two columns to one channel', async () => {
    const text = 'time,a,b\n1735689600,1,2\n1735689600.1,1,2\n';
    const run = (mapping: Record<string, string>) => refusal(dir, [{ name: 'm.csv', content: text }], { mapping });
    expect(await run({ a: 'moorgate.freq', b: 'ignore', c: 'ignore' })).toEqual({
      code: 'BAD_MAPPING',
      message: 'mapping names column "c", which is not in the file (its columns: "a", "b")',
    });
    expect(await run({ a: 'nowhere.freq', b: 'ignore' })).toEqual({
      code: 'BAD_MAPPING',
      message: 'mapping sends column "a" to "nowhere.freq", which is not a channel of the network',
    });
    expect(await run({ a: 'moorgate.freq', b: 'moorgate.freq' })).toEqual({
      code: 'BAD_MAPPING',
      message: 'columns "a" and "b" both go to channel "moorgate.freq"; map one of them elsewhere or to "ignore"',
    });
    expect(await run({ a: 'ignore', b: 'ignore' })).toEqual({
      code: 'BAD_MAPPING',
      message: 'every column is mapped to "ignore"; there is nothing to store',
    });
  });

  it("reads the CSV the estimators' command line writes (modal/formats writeCsv), epoch and ISO times", async () => {
    const n = 500;
    const record = {
      startTime: 1_735_689_600.25,
      rate: 30,
      channels: [
        { name: 'moorgate.angle', values: Float64Array.from({ length: n }, (_, i) => 12 + Math.sin(i / 7)) },
        { name: 'moorgate.mw', values: Float64Array.from({ length: n }, (_, i) => (i === 42 ? NaN : 1200 + i / 10)) },
      ],
    };
    for (const time of ['epoch', 'iso'] as const) {
      const text = writeCsv(record, { time, decimals: 6 });
      const r = await ingestToMemory(writeUpload(dir, [{ name: `cli-${time}.csv`, content: text }]));
      expect(r.summary.rate).toBe(30);
      expect(r.summary.frames).toBe(n);
      expect(r.summary.startTime).toBeCloseTo(record.startTime, 3);
      expect(r.series['moorgate.mw'][42]).toBeNaN();
      for (let i = 0; i < n; i += 37) expect(r.series['moorgate.angle'][i]).toBeCloseTo(record.channels[0].values[i], 6);
    }
  });

  it('reports the first fault in file order, even when the CSV tokenizer meets a later one first', async () => {
    const s = tarrowSeries(6000);
    const lines = csvText(s).trimEnd().split('\n');
    lines[3999] = lines[3999].replace(/,([^,]*)$/, ',"$1'); // line 4000: a quote never closed
    expect((await refusal(dir, [{ name: 'q.csv', content: lines.join('\n') }])).message).toBe(
      'line 4000: a quoted field opened in this row is never closed (the file may be truncated)',
    );
    lines[2499] = lines[2499].replace(/,([^,]*)$/, ',x'); // line 2500: text, before the quote
    expect((await refusal(dir, [{ name: 'q2.csv', content: lines.join('\n') }])).message).toBe(
      "line 2500: column 'saltreach-bay.angle': value 'x' is not a number",
    );
  });

  it('reports progress as a growing fraction of the bytes read, ending at 1', async () => {
    const s = tarrowSeries(40_000); // ~1.6 MB: several reads of the 256 KiB file buffer
    const seen: number[] = [];
    await ingestToMemory(writeUpload(dir, [{ name: 'p.csv', content: csvText(s) }]), {
      progressEvery: 16 * 1024,
      onProgress: (f) => void seen.push(f),
    });
    expect(seen.filter((f) => f > 0 && f < 1).length).toBeGreaterThan(2);
    expect(seen).toEqual([...seen].sort((a, b) => a - b));
    expect(seen[seen.length - 1]).toBe(1);
  });
});

describe('COMTRADE (IEEE C37.111, standard)', () => {
  const s = tarrowSeries(200);
  s.channels['moorgate.freq'][7] = NaN;
  // Values go through raw integers: a = 0.001 ° and 1e-6 Hz per count (make-files.ts).
  const tol = 0.0005 + 1e-9;

  it('reads a 1999 ASCII .cfg/.dat pair: value = a·raw + b, empty field = dropout, rate from the .cfg', async () => {
    const r = await ingestToMemory(
      writeUpload(dir, [
        { name: 'event.cfg', content: comtradeCfg(s) },
        { name: 'event.dat', content: comtradeAsciiDat(s) },
      ]),
    );
    expect(r.summary.format).toBe('comtrade');
    expect(r.summary.rate).toBe(30);
    expect(r.summary.frames).toBe(200);
    expect(r.summary.startTime).toBe(s.start);
    expectSeries(r.series, s, tol);
    expect(r.summary.channels.map((c) => c.unit)).toEqual(['deg', 'Hz', 'deg']);
    expect(r.summary.channels[1].quality.dropouts).toBe(1);
  });

  it('accepts the pair in either order and digital channels (read past, not stored)', async () => {
    const r = await ingestToMemory(
      writeUpload(dir, [
        { name: 'EVENT.DAT', content: comtradeAsciiDat(s, { digital: 2 }) },
        { name: 'EVENT.CFG', content: comtradeCfg(s, { digital: 2 }) },
      ]),
    );
    expect(r.summary.channels).toHaveLength(3);
    expectSeries(r.series, s, tol);
  });

  for (const ft of ['BINARY', 'BINARY32', 'FLOAT32'] as const) {
    it(`reads a 2013 ${ft} .dat (little-endian records; missing raw value marks a dropout)`, async () => {
      const r = await ingestToMemory(
        writeUpload(dir, [
          { name: 'bin.cfg', content: comtradeCfg(s, { rev: 2013, fileType: ft }) },
          { name: 'bin.dat', content: comtradeBinaryDat(s, ft, { digital: 0 }) },
        ]),
      );
      expect(r.summary.rate).toBe(30);
      expectSeries(r.series, s, ft === 'FLOAT32' ? tol + 1e-4 : tol);
    });
  }

  it('applies the 2013 time_code: local time −5h30 is UTC + 5 h 30 min', async () => {
    const r = await ingestToMemory(
      writeUpload(dir, [
        { name: 'tz.cfg', content: comtradeCfg(s, { rev: 2013, timeCode: '-5h30' }) },
        { name: 'tz.dat', content: comtradeAsciiDat(s) },
      ]),
    );
    expect(r.summary.startTime).toBe(s.start + 5.5 * 3600);
  });

  it('keeps a gap in the .dat timestamps as missing frames', async () => {
    // Sample numbers stay consecutive; the timestamps jump over frames 50..59.
    const dat = comtradeAsciiDat(s)
      .trimEnd()
      .split('\r\n')
      .filter((_, i) => i < 50 || i >= 60)
      .map((line, k) => line.replace(/^\d+/, String(k + 1)))
      .join('\r\n');
    const r = await ingestToMemory(
      writeUpload(dir, [
        { name: 'gap.cfg', content: comtradeCfg(s, { endsamp: 190 }) },
        { name: 'gap.dat', content: dat },
      ]),
    );
    expect(r.summary.frames).toBe(200);
    expect(r.summary.gaps).toBe(1);
    expect(r.summary.missingFrames).toBe(10);
    expect(r.series['moorgate.angle'][55]).toBeNaN();
  });

  it("reads the COMTRADE the estimators' command line writes (modal/formats): ASCII, BINARY, .cff", async () => {
    const n = 300;
    const record = {
      startTime: 1_735_689_600.5,
      rate: 60,
      channels: [
        { name: 'windlow.angle', values: Float64Array.from({ length: n }, (_, i) => -40 + 3 * Math.sin(i / 9)) },
        { name: 'windlow.freq', values: Float64Array.from({ length: n }, (_, i) => (i === 17 ? NaN : 60 + 0.004 * Math.cos(i / 5))) },
      ],
    };
    const check = (r: Awaited<ReturnType<typeof ingestToMemory>>, rawMax: number) => {
      expect(r.summary.rate).toBe(60);
      expect(r.summary.startTime).toBeCloseTo(record.startTime, 6);
      expect(r.series['windlow.freq'][17]).toBeNaN();
      record.channels.forEach((c) => {
        // The writer spreads each channel's span over ±rawMax counts: half a count of error at most.
        const span = Math.max(...c.values.filter(Number.isFinite)) - Math.min(...c.values.filter(Number.isFinite));
        const tolerance = (span / 2 / rawMax) * 0.5 * (1 + 1e-9);
        for (let i = 0; i < n; i++) if (i !== 17) expect(Math.abs(r.series[c.name][i] - c.values[i])).toBeLessThanOrEqual(tolerance);
      });
    };
    for (const fileType of ['ASCII', 'BINARY'] as const) {
      const { cfg, dat } = writeComtrade(record, { fileType });
      const r = await ingestToMemory(
        writeUpload(dir, [
          { name: `cli-${fileType}.cfg`, content: cfg },
          { name: `cli-${fileType}.dat`, content: Buffer.from(dat) },
        ]),
      );
      check(r, fileType === 'ASCII' ? 99998 : 32767);
    }
    check(await ingestToMemory(writeUpload(dir, [{ name: 'cli.cff', content: writeCff(record) }])), 99998);
  });

  it('converts secondary values to primary (P/S flag S: × primary / secondary)', async () => {
    const cfg = comtradeCfg(s, { replaceLine: { 4: '3,saltreach-bay.angle,,,deg,0.001,0,0,-32767,32767,2,1,S' } });
    const r = await ingestToMemory(
      writeUpload(dir, [
        { name: 'ps.cfg', content: cfg },
        { name: 'ps.dat', content: comtradeAsciiDat(s) },
      ]),
    );
    expect(r.series['saltreach-bay.angle'][5]).toBeCloseTo(2 * s.channels['saltreach-bay.angle'][5], 2);
  });

  it('reads .cff files with ASCII and BINARY data sections', async () => {
    const a = await ingestToMemory(writeUpload(dir, [{ name: 'one.cff', content: comtradeCff(comtradeCfg(s, { rev: 2013 }), comtradeAsciiDat(s), 'ASCII') }]));
    expect(a.summary.format).toBe('cff');
    expectSeries(a.series, s, tol);
    const b = await ingestToMemory(
      writeUpload(dir, [
        { name: 'one-bin.cff', content: comtradeCff(comtradeCfg(s, { rev: 2013, fileType: 'BINARY' }), comtradeBinaryDat(s), 'BINARY') },
      ]),
    );
    expectSeries(b.series, s, tol);
  });
});
