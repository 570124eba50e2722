// Builds the malformed-upload corpus in tests/fixtures-bad/files/ (run: npx tsx
// tests/fixtures-bad/generate.ts). The files are committed; this script documents how each one
// was made. The expected refusal of each is in cases.ts. The oversized file is not here: the
// integration test generates it (committing megabytes of nothing would help nobody).
import fs from 'node:fs';
import path from 'node:path';
import {
  comtradeAsciiDat,
  comtradeBinaryDat,
  comtradeCff,
  comtradeCfg,
  csvText,
  epochText,
  isoText,
  tarrowSeries,
} from './make-files';

export const FILES_DIR = path.join(__dirname, 'files');

/** 40 frames at 30 frames/s from 2025-01-01T00:00:00Z; frame i is on CSV line i + 2. */
const S = tarrowSeries(40);
const t = (i: number) => epochText(S.start + i / 30);
const good = () => csvText(S).trimEnd().split('\n');
const withLines = (edit: (lines: string[]) => void): string => {
  const lines = good();
  edit(lines);
  return lines.join('\n') + '\n';
};
/** CSV line n (1-based) of the base file. */
const L = (lines: string[], n: number) => lines[n - 1];

export function corpusFiles(): Record<string, string | Buffer> {
  const f: Record<string, string | Buffer> = {};
  f['empty.csv'] = '';
  f['blank-lines.csv'] = '\n\n  \n';
  f['header-only.csv'] = good()[0] + '\n';
  f['truncated-row.csv'] = good().join('\n').slice(0, -14);
  f['text-in-number.csv'] = withLines((l) => {
    l[16] = L(l, 17).replace(/,([^,]*),([^,]*)$/, ',abc,$2');
  });
  f['nan-text.csv'] = withLines((l) => {
    l[8] = L(l, 9).replace(/^([^,]*),([^,]*)/, '$1,NaN');
  });
  f['inf-text.csv'] = withLines((l) => {
    l[9] = L(l, 10).replace(/,([^,]*)$/, ',-Infinity');
  });
  f['decimal-comma.csv'] = withLines((l) => {
    l[5] = L(l, 6).replace(/^([^,]*),([^,]*)/, '$1,"12,5"');
  });
  f['decreasing-time.csv'] = withLines((l) => {
    l[11] = L(l, 12).replace(/^[^,]*/, t(8));
  });
  f['duplicate-time.csv'] = withLines((l) => {
    l[16] = L(l, 17).replace(/^[^,]*/, t(14));
  });
  // 37 frames/s: not an IEEE C37.118.1 rate.
  f['rate-37.csv'] = csvText({ ...S, rate: 37 });
  // 30 frames/s, but one row half a frame late.
  f['off-grid.csv'] = withLines((l) => {
    l[19] = L(l, 20).replace(/^[^,]*/, epochText(S.start + 18.5 / 30));
  });
  f['long-gap.csv'] = withLines((l) => {
    for (let n = 22; n <= 41; n++) l[n - 1] = L(l, n).replace(/^[^,]*/, epochText(S.start + 3600 + (n - 2) / 30));
  });
  f['wrong-column-count.csv'] = withLines((l) => {
    l[7] = L(l, 8) + ',0.5';
  });
  f['missing-time-column.csv'] = withLines((l) => {
    l[0] = l[0].replace(/^time/, 'clock');
  });
  f['semicolons.csv'] = good()
    .map((x) => x.replace(/,/g, ';'))
    .join('\n');
  f['duplicate-column.csv'] = withLines((l) => {
    l[0] = l[0].replace('saltreach-bay.angle', 'moorgate.freq');
  });
  f['no-header.csv'] = good().slice(1).join('\n');
  f['unclosed-quote.csv'] = withLines((l) => {
    l[29] = L(l, 30).replace(/,([^,]*)$/, ',"$1');
  });
  f['one-row.csv'] = good().slice(0, 2).join('\n');
  f['iso-without-zone.csv'] = csvText(S, { time: 'iso' }).replace(/Z,/g, ',');
  f['mixed-time-forms.csv'] = withLines((l) => {
    for (let n = 2; n <= 41; n++) if (n !== 6) l[n - 1] = L(l, n).replace(/^[^,]*/, isoText(S.start + (n - 2) / 30));
  });
  f['milliseconds.csv'] = withLines((l) => {
    for (let n = 2; n <= 41; n++) l[n - 1] = L(l, n).replace(/^[^,]*/, String(Math.round((S.start + (n - 2) / 30) * 1000)));
  });
  f['unknown-columns.csv'] = withLines((l) => {
    l[0] = l[0].replace('saltreach-bay.angle', 'PMU 7 Vang');
  });
  // A Latin-1 degree sign (0xB0) in the header: not UTF-8.
  f['latin1-header.csv'] = Buffer.concat([
    Buffer.from('time,moorgate.angle,moorgate.freq,Saltreach Bay angle ('),
    Buffer.from([0xb0]),
    Buffer.from(')\n' + good().slice(1).join('\n') + '\n'),
  ]);
  f['utf16.csv'] = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(csvText(S), 'utf16le')]);
  f['utf16-no-bom.csv'] = Buffer.from(csvText(S), 'utf16le');
  // Two exports pasted together: the second one's byte-order mark and header in the middle.
  f['pasted-files.csv'] = csvText(S) + '\uFEFF' + csvText(S);
  f['spreadsheet.xlsx'] = Buffer.from('504b0304140000000800', 'hex');

  // COMTRADE (IEEE C37.111): .cfg line numbers: 1 station, 2 counts, 3-5 analog channels,
  // 6 line frequency, 7 nrates, 8 samp/endsamp, 9-10 times, 11 file type, 12 timemult.
  const cfg = comtradeCfg(S);
  f['alone.cfg'] = cfg;
  f['alone.dat'] = comtradeAsciiDat(S);
  f['bad-multiplier.cfg'] = comtradeCfg(S, { replaceLine: { 3: '2,moorgate.freq,,,Hz,x0.000001,60,0,-32767,32767,1,1,P' } });
  f['bad-multiplier.dat'] = comtradeAsciiDat(S);
  f['zero-multiplier.cfg'] = comtradeCfg(S, { replaceLine: { 2: '1,moorgate.angle,,,deg,0,0,0,-32767,32767,1,1,P' } });
  f['zero-multiplier.dat'] = comtradeAsciiDat(S);
  f['bad-counts.cfg'] = comtradeCfg(S, { replaceLine: { 1: '4,3A,0D' } });
  f['bad-counts.dat'] = comtradeAsciiDat(S);
  f['rev-1991.cfg'] = comtradeCfg(S, { replaceLine: { 0: 'Tarrow Moorgate PMU,MG-1' } });
  f['rev-1991.dat'] = comtradeAsciiDat(S);
  f['rate-100.cfg'] = comtradeCfg(S, { samp: 100 });
  f['rate-100.dat'] = comtradeAsciiDat(S);
  f['text-in-dat.cfg'] = cfg;
  f['text-in-dat.dat'] = comtradeAsciiDat(S, { replace: { 4: `5,133333,12345,n/a,-8000` } });
  f['sample-skip.cfg'] = cfg;
  f['sample-skip.dat'] = comtradeAsciiDat(S, { drop: [6] });
  f['front-cut.cfg'] = cfg;
  f['front-cut.dat'] = comtradeAsciiDat(S, { drop: [0, 1, 2] });
  f['short-ascii.cfg'] = cfg;
  f['short-ascii.dat'] = comtradeAsciiDat(S, { drop: [36, 37, 38, 39] });
  f['short-binary.cfg'] = comtradeCfg(S, { fileType: 'BINARY' });
  f['short-binary.dat'] = comtradeBinaryDat(S, 'BINARY').subarray(0, 14 * 40 - 10);
  f['dat-columns.cfg'] = cfg;
  f['dat-columns.dat'] = comtradeAsciiDat(S, { replace: { 11: '12,366667,12345,2000' } });
  f['cff-no-dat.cff'] = comtradeCff(comtradeCfg(S, { rev: 2013 }), '', 'ASCII').subarray(0, -'--- file type: DAT ASCII: 0 ---\r\n'.length);
  f['cff-type-mismatch.cff'] = comtradeCff(comtradeCfg(S, { rev: 2013 }), comtradeBinaryDat(S), 'BINARY');
  f['cff-short-binary.cff'] = (() => {
    const full = comtradeCff(comtradeCfg(S, { rev: 2013, fileType: 'BINARY' }), comtradeBinaryDat(S), 'BINARY');
    return full.subarray(0, full.length - 14 * 3);
  })();
  f['not-a-cff.cff'] = csvText(S);
  return f;
}

if (require.main === module) {
  fs.mkdirSync(FILES_DIR, { recursive: true });
  for (const [name, content] of Object.entries(corpusFiles())) fs.writeFileSync(path.join(FILES_DIR, name), content);
  console.log(`wrote ${Object.keys(corpusFiles()).length} files to ${FILES_DIR}`);
}
