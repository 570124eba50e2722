// A small seeded mutator for upload fuzzing: takes valid CSV and COMTRADE uploads (heads of the
// Tarrow fixtures and files written by tests/fixtures-bad/make-files.ts) and damages them the ways
// files get damaged in practice — flipped bytes, truncation, duplicated / removed / swapped lines,
// swapped fields, odd numbers and text in cells, a damaged header, broken encodings and damaged
// COMTRADE .cfg lines. Every case is a pure function of its seed, so a failing case is replayed by
// its seed alone (`makeCase(seed)`).
import fs from 'node:fs';
import path from 'node:path';
import {
  comtradeAsciiDat,
  comtradeBinaryDat,
  comtradeCff,
  comtradeCfg,
  csvText,
  tarrowSeries,
} from '../fixtures-bad/make-files';

export interface FuzzFile {
  name: string;
  content: Buffer;
}

export interface FuzzCase {
  seed: number;
  /** Label of the valid upload the case started from. */
  base: string;
  /** What was done to it, in order (for the failure message). */
  mutations: string[];
  /** The kind of each mutation (MUTATION_KINDS), in the same order. */
  kinds: MutationKind[];
  files: FuzzFile[];
}

export const MUTATION_KINDS = [
  'bit flips',
  'byte values',
  'truncation',
  'duplicated line',
  'removed lines',
  'swapped lines',
  'swapped fields',
  'number in a cell',
  'text in a cell',
  'header damage',
  'encoding damage',
  'cfg line damage',
  'moved bytes',
  'file name',
] as const;
export type MutationKind = (typeof MUTATION_KINDS)[number];

export type Rng = () => number;

/** mulberry32: a tiny 32-bit generator, plenty for choosing mutations (not for cryptography). */
export function rngFrom(seed: number): Rng {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const int = (r: Rng, lo: number, hi: number) => lo + Math.floor(r() * (hi - lo + 1)); // inclusive
const pick = <T>(r: Rng, xs: readonly T[]): T => xs[Math.floor(r() * xs.length)];

// ---------------------------------------------------------------- valid uploads to start from

const FIXTURES = path.resolve(__dirname, '..', '..', 'fixtures');
/** Frames kept of each fixture: 2 s at 30 frames/s keeps a case small and fast. */
const HEAD_FRAMES = 60;

export interface BaseUpload {
  label: string;
  files: FuzzFile[];
}

function headLines(text: string, n: number): string {
  const lines = text.split(/(?<=\n)/);
  return lines.slice(0, n).join('');
}

let cachedBases: BaseUpload[] | null = null;

/** The valid uploads mutated by the fuzzer (each is accepted as it is — checked by the tests). */
export function baseUploads(): BaseUpload[] {
  if (cachedBases) return cachedBases;
  const csv = fs.readFileSync(path.join(FIXTURES, 'ringdown-line-trip-2000mw.csv'), 'utf8');
  const cfg = fs.readFileSync(path.join(FIXTURES, 'ringdown-generator-loss-1200mw.cfg'), 'latin1');
  const dat = fs.readFileSync(path.join(FIXTURES, 'ringdown-generator-loss-1200mw.dat'), 'latin1');
  // The .cfg declares the fixture's full length ("30,1050"): the head keeps HEAD_FRAMES samples.
  const cfgHead = cfg.replace(/^30,1050\r?$/m, `30,${HEAD_FRAMES}`);
  if (cfgHead === cfg) throw new Error('fuzz bases: the fixture .cfg no longer has its "30,1050" sample-rate line');

  const s30 = tarrowSeries(HEAD_FRAMES, 30, 1_767_225_600);
  const s60 = tarrowSeries(HEAD_FRAMES, 60, 1_767_229_200);
  const sBin = tarrowSeries(HEAD_FRAMES, 30, 1_767_232_800);
  const sF32 = tarrowSeries(HEAD_FRAMES, 30, 1_767_236_400);
  cachedBases = [
    { label: 'fixture csv (23 channels, epoch times)', files: [{ name: 'line-trip-head.csv', content: Buffer.from(headLines(csv, HEAD_FRAMES + 1)) }] },
    {
      label: 'fixture COMTRADE ASCII pair',
      files: [
        { name: 'generator-loss-head.cfg', content: Buffer.from(cfgHead, 'latin1') },
        { name: 'generator-loss-head.dat', content: Buffer.from(headLines(dat, HEAD_FRAMES), 'latin1') },
      ],
    },
    { label: 'csv with ISO times and CRLF', files: [{ name: 'moorgate-iso.csv', content: Buffer.from(csvText(s30, { time: 'iso', eol: '\r\n' })) }] },
    {
      label: 'COMTRADE BINARY pair (2013)',
      files: [
        { name: 'moorgate-bin.cfg', content: Buffer.from(comtradeCfg(sBin, { rev: 2013, fileType: 'BINARY' })) },
        { name: 'moorgate-bin.dat', content: comtradeBinaryDat(sBin, 'BINARY') },
      ],
    },
    {
      label: 'COMTRADE FLOAT32 pair (2013)',
      files: [
        { name: 'moorgate-f32.cfg', content: Buffer.from(comtradeCfg(sF32, { rev: 2013, fileType: 'FLOAT32' })) },
        { name: 'moorgate-f32.dat', content: comtradeBinaryDat(sF32, 'FLOAT32') },
      ],
    },
    { label: 'single-file .cff (ASCII, 60 frames/s)', files: [{ name: 'moorgate.cff', content: comtradeCff(comtradeCfg(s60, { rev: 2013 }), comtradeAsciiDat(s60), 'ASCII') }] },
  ];
  return cachedBases;
}

// ---------------------------------------------------------------- mutations

/** Text view that keeps every byte (latin1 maps bytes 0..255 one to one). */
const asText = (b: Buffer) => b.toString('latin1');
const fromText = (s: string) => Buffer.from(s, 'latin1');
const utf8Bytes = (s: string) => Buffer.from(s, 'utf8').toString('latin1');

/** Lines with their line ends kept, so joining gives the file back. */
function linesOf(b: Buffer): string[] {
  const parts = asText(b).split(/(?<=\n)/);
  return parts.length ? parts : [''];
}
function eolOf(line: string): string {
  return line.endsWith('\r\n') ? '\r\n' : line.endsWith('\n') ? '\n' : '';
}
function bodyOf(line: string): string {
  return line.slice(0, line.length - eolOf(line).length);
}

const ODD_NUMBERS = [
  '0', '-0', '1e308', '-1e308', '1e999', '4.9e-324', 'NaN', 'nan', 'Infinity', '-inf', '0x1F', '1,5', '1.2.3', '+5', ' 7 ',
  '', '9'.repeat(400), '99999999999', '-1735689600', '1735689600.0333333333333333', '1e3', '.5', '5.', '--1', '1e', '١٢٣',
];
const ODD_TEXT = [
  '"', '""', '"a,b"', 'n/a', '—', utf8Bytes('é'), '\t', ' ', 'null', '\\N', '=1+1', 'x'.repeat(2000), utf8Bytes('∿'), '\u0000', '\r', ';', '"\n"',
];

type Mutation = ((r: Rng, b: Buffer, file: FuzzFile) => { b: Buffer; what: string } | null) & { kind?: MutationKind };

const flipBits: Mutation = (r, b) => {
  if (b.length === 0) return null;
  const out = Buffer.from(b);
  const n = int(r, 1, 8);
  for (let i = 0; i < n; i++) out[int(r, 0, out.length - 1)] ^= 1 << int(r, 0, 7);
  return { b: out, what: `flip ${n} bit(s)` };
};

const setBytes: Mutation = (r, b) => {
  if (b.length === 0) return null;
  const out = Buffer.from(b);
  const values = [0x00, 0xff, 0x80, 0xc3, 0x2c, 0x0a, 0x0d, 0x22, 0x2d, 0x2e, 0x65, 0x3b, 0x20];
  const n = int(r, 1, 4);
  for (let i = 0; i < n; i++) out[int(r, 0, out.length - 1)] = pick(r, values);
  return { b: out, what: `set ${n} byte(s)` };
};

const truncate: Mutation = (r, b) => {
  const at = int(r, 0, b.length);
  return { b: b.subarray(0, at), what: `truncate at byte ${at} of ${b.length}` };
};

const duplicateLine: Mutation = (r, b) => {
  const lines = linesOf(b);
  const i = int(r, 0, lines.length - 1);
  const to = r() < 0.6 ? i + 1 : int(r, 0, lines.length);
  const copy = eolOf(lines[i]) ? lines[i] : `${lines[i]}\n`;
  lines.splice(to, 0, copy);
  return { b: fromText(lines.join('')), what: `duplicate line ${i + 1} at ${to + 1}` };
};

const removeLines: Mutation = (r, b) => {
  const lines = linesOf(b);
  if (lines.length < 2) return null;
  const i = int(r, 0, lines.length - 1);
  const n = Math.min(int(r, 1, 3), lines.length - i);
  lines.splice(i, n);
  return { b: fromText(lines.join('')), what: `remove ${n} line(s) from ${i + 1}` };
};

const swapLines: Mutation = (r, b) => {
  const lines = linesOf(b).map(bodyOf);
  const eol = eolOf(linesOf(b)[0]) || '\n';
  if (lines.length < 3) return null;
  const i = int(r, 0, lines.length - 2);
  const j = int(r, 0, lines.length - 2);
  [lines[i], lines[j]] = [lines[j], lines[i]];
  return { b: fromText(lines.join(eol)), what: `swap lines ${i + 1} and ${j + 1}` };
};

/** Changes one comma-separated cell of a random line. */
function cellEdit(r: Rng, b: Buffer, edit: (cells: string[], k: number) => string): { b: Buffer; what: string } | null {
  const lines = linesOf(b);
  const i = int(r, 0, lines.length - 1);
  const cells = bodyOf(lines[i]).split(',');
  const k = int(r, 0, cells.length - 1);
  const what = edit(cells, k);
  lines[i] = cells.join(',') + eolOf(lines[i]);
  return { b: fromText(lines.join('')), what: `line ${i + 1} cell ${k + 1}: ${what}` };
}

const swapFields: Mutation = (r, b) =>
  cellEdit(r, b, (cells, k) => {
    const m = int(r, 0, cells.length - 1);
    [cells[k], cells[m]] = [cells[m], cells[k]];
    return `swap with cell ${m + 1}`;
  });

const oddNumber: Mutation = (r, b) =>
  cellEdit(r, b, (cells, k) => {
    const v = r() < 0.3 ? String((r() - 0.5) * 10 ** int(r, -5, 12)) : pick(r, ODD_NUMBERS);
    cells[k] = v;
    return `number ${JSON.stringify(v.length > 30 ? `${v.slice(0, 30)}…` : v)}`;
  });

const oddText: Mutation = (r, b) =>
  cellEdit(r, b, (cells, k) => {
    const v = pick(r, ODD_TEXT);
    cells[k] = r() < 0.5 ? v : cells[k] + v;
    return `text ${JSON.stringify(v.length > 30 ? `${v.slice(0, 30)}…` : v)}`;
  });

const headerDamage: Mutation = (r, b, file) => {
  if (/\.(dat)$/i.test(file.name)) return null;
  const lines = linesOf(b);
  const eol = eolOf(lines[0]);
  const cells = bodyOf(lines[0]).split(',');
  const k = int(r, 0, cells.length - 1);
  let what: string;
  switch (int(r, 0, 7)) {
    case 0:
      cells[k] = pick(r, ['PMU 12 angle', 'unknown.freq', 'TIME', 'Time (UTC)', '', 'moorgate.angle', utf8Bytes('Saltreach °')]);
      what = `rename column ${k + 1} to ${JSON.stringify(cells[k])}`;
      break;
    case 1:
      cells.splice(k, 1);
      what = `drop column name ${k + 1}`;
      break;
    case 2:
      cells.splice(k, 0, cells[int(r, 0, cells.length - 1)]);
      what = `duplicate a column name at ${k + 1}`;
      break;
    case 3:
      cells.push('');
      what = 'add an empty column name';
      break;
    case 4:
      lines[0] = cells.join(';') + eol;
      return { b: fromText(lines.join('')), what: 'header separated by semicolons' };
    case 5:
      lines[0] = cells.join(',').toUpperCase() + eol;
      return { b: fromText(lines.join('')), what: 'header in capitals' };
    case 6:
      lines[0] = eol || '\n';
      return { b: fromText(lines.join('')), what: 'empty header line' };
    default:
      lines.splice(0, 1);
      return { b: fromText(lines.join('')), what: 'header removed' };
  }
  lines[0] = cells.join(',') + eol;
  return { b: fromText(lines.join('')), what: `header: ${what}` };
};

const encodingDamage: Mutation = (r, b) => {
  const at = int(r, 0, b.length);
  const insert = (bytes: number[], what: string) => ({ b: Buffer.concat([b.subarray(0, at), Buffer.from(bytes), b.subarray(at)]), what: `${what} at byte ${at}` });
  switch (int(r, 0, 8)) {
    case 0:
      return insert([0xc3], 'lone UTF-8 lead byte');
    case 1:
      return insert([0xff, 0xfe], 'stray UTF-16 byte-order mark');
    case 2:
      return insert([0x00], 'NUL byte');
    case 3:
      return insert([0xef, 0xbb, 0xbf], 'UTF-8 byte-order mark');
    case 4:
      return insert([0xb0], 'Latin-1 degree sign');
    case 5: {
      const le = Buffer.from(asText(b), 'utf16le');
      return { b: r() < 0.5 ? Buffer.concat([Buffer.from([0xff, 0xfe]), le]) : le, what: 'whole file as UTF-16LE' };
    }
    case 6:
      return { b: fromText(asText(b).replace(/\r?\n/g, '\r')), what: 'CR-only line ends' };
    case 7:
      return insert([0xe2, 0x82], 'cut-off three-byte UTF-8 sequence');
    default:
      return { b: Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), b]), what: 'byte-order mark at the start' };
  }
};

/** Damage to one line of a COMTRADE configuration (a .cfg, or the CFG section of a .cff). */
const cfgLineDamage: Mutation = (r, b, file) => {
  if (!/\.(cfg|cff)$/i.test(file.name)) return null;
  const lines = linesOf(b);
  // In a .cff the CFG section follows its marker line; stop before the DAT marker.
  const first = /\.cff$/i.test(file.name) ? 1 : 0;
  let last = lines.findIndex((l) => /^--- file type: (INF|HDR|DAT)/i.test(l));
  if (last < 0) last = lines.length;
  if (last - first < 1) return null;
  const i = int(r, first, last - 1);
  const eol = eolOf(lines[i]) || '\r\n';
  const cells = bodyOf(lines[i]).split(',');
  const k = int(r, 0, cells.length - 1);
  let what: string;
  switch (int(r, 0, 6)) {
    case 0:
      cells[k] = pick(r, ['0', '-30', '1e9', '4294967296', '', 'x', '30.5', '99999999', 'NaN', '-1']);
      what = `field ${k + 1} := ${JSON.stringify(cells[k])}`;
      break;
    case 1:
      cells.splice(k, 1);
      what = `field ${k + 1} removed`;
      break;
    case 2:
      cells.push(pick(r, ['', '0', 'extra']));
      what = 'a field added';
      break;
    case 3:
      lines.splice(i, 1);
      return { b: fromText(lines.join('')), what: `cfg line ${i + 1} removed` };
    case 4:
      lines.splice(i, 0, lines[i]);
      return { b: fromText(lines.join('')), what: `cfg line ${i + 1} duplicated` };
    case 5:
      lines[i] = pick(r, ['ASCII', 'BINARY', 'BINARY32', 'FLOAT32', 'TEXT', '60', '50', '0', '01/13/2025,25:61:61.000000', '1,30,60', '']) + eol;
      return { b: fromText(lines.join('')), what: `cfg line ${i + 1} replaced by ${JSON.stringify(bodyOf(lines[i]))}` };
    default:
      cells[k] = cells[k].replace(/\d/g, () => String(int(r, 0, 9)));
      what = `digits of field ${k + 1} shuffled`;
  }
  lines[i] = cells.join(',') + eol;
  return { b: fromText(lines.join('')), what: `cfg line ${i + 1}: ${what}` };
};

/** Binary data: a run of bytes copied elsewhere or cut out (records slide against the .cfg). */
const chunkDamage: Mutation = (r, b) => {
  if (b.length < 4) return null;
  const from = int(r, 0, b.length - 1);
  const len = int(r, 1, Math.min(64, b.length - from));
  if (r() < 0.5) return { b: Buffer.concat([b.subarray(0, from), b.subarray(from + len)]), what: `cut ${len} byte(s) at ${from}` };
  const to = int(r, 0, b.length);
  return { b: Buffer.concat([b.subarray(0, to), b.subarray(from, from + len), b.subarray(to)]), what: `copy ${len} byte(s) from ${from} to ${to}` };
};

flipBits.kind = 'bit flips';
setBytes.kind = 'byte values';
truncate.kind = 'truncation';
duplicateLine.kind = 'duplicated line';
removeLines.kind = 'removed lines';
swapLines.kind = 'swapped lines';
swapFields.kind = 'swapped fields';
oddNumber.kind = 'number in a cell';
oddText.kind = 'text in a cell';
headerDamage.kind = 'header damage';
encodingDamage.kind = 'encoding damage';
cfgLineDamage.kind = 'cfg line damage';
chunkDamage.kind = 'moved bytes';

const TEXT_MUTATIONS: [Mutation, number][] = [
  [flipBits, 3],
  [setBytes, 2],
  [truncate, 2],
  [duplicateLine, 2],
  [removeLines, 2],
  [swapLines, 2],
  [swapFields, 2],
  [oddNumber, 3],
  [oddText, 2],
  [headerDamage, 2],
  [encodingDamage, 2],
  [cfgLineDamage, 4],
];
const BINARY_MUTATIONS: [Mutation, number][] = [
  [flipBits, 3],
  [setBytes, 2],
  [truncate, 2],
  [chunkDamage, 3],
];

function weighted(r: Rng, table: [Mutation, number][]): Mutation {
  const total = table.reduce((s, [, w]) => s + w, 0);
  let x = r() * total;
  for (const [m, w] of table) {
    x -= w;
    if (x < 0) return m;
  }
  return table[table.length - 1][0];
}

function isBinaryDat(c: FuzzCase, f: FuzzFile): boolean {
  if (!/\.dat$/i.test(f.name)) return false;
  const cfg = c.files.find((x) => /\.cfg$/i.test(x.name));
  return !!cfg && /\n(BINARY|BINARY32|FLOAT32)\r?\n/i.test(asText(cfg.content));
}

/** Case `seed`: a base upload with 1–3 mutations (now and then a file-name change as well). */
export function makeCase(seed: number): FuzzCase {
  const r = rngFrom(seed);
  const bases = baseUploads();
  const base = bases[Math.floor(r() * bases.length)];
  const c: FuzzCase = { seed, base: base.label, mutations: [], kinds: [], files: base.files.map((f) => ({ name: f.name, content: Buffer.from(f.content) })) };
  const n = int(r, 1, 3);
  for (let tries = 0; c.mutations.length < n && tries < 20; tries++) {
    const fi = int(r, 0, c.files.length - 1);
    const f = c.files[fi];
    const m = weighted(r, isBinaryDat(c, f) ? BINARY_MUTATIONS : TEXT_MUTATIONS);
    const out = m(r, f.content, f);
    if (!out) continue;
    c.files[fi] = { name: f.name, content: out.b };
    c.mutations.push(`${f.name}: ${out.what}`);
    c.kinds.push(m.kind!);
  }
  if (r() < 0.03) {
    const fi = int(r, 0, c.files.length - 1);
    const name = c.files[fi].name;
    const renamed = pick(r, [name.toUpperCase(), name.replace(/\.\w+$/, '.txt'), `${name}.bak`, name.replace(/\.\w+$/, '')]);
    c.files[fi] = { ...c.files[fi], name: renamed };
    c.mutations.push(`renamed ${name} to ${renamed}`);
    c.kinds.push('file name');
  }
  return c;
}

/** One line describing a case, for failure messages. */
export function describeCase(c: FuzzCase): string {
  return `seed ${c.seed} (${c.base}): ${c.mutations.join('; ') || 'no change'}`;
}
