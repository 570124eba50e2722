// Writers of small upload files for the ingest tests, written by hand from the format rules and
// independent of the readers under test: CSV (DESIGN.md §5.5) and COMTRADE .cfg / .dat / .cff
// (IEEE C37.111-1999/-2013, standard: field order of each .cfg line, sample number and µs
// timestamp leading each .dat row, little-endian binary records, int16 raw 0x8000 = missing).
// Data are set in the invented Tarrow grid.

export interface Series {
  /** Epoch seconds of the first frame. */
  start: number;
  rate: number;
  /** Channel name → values (NaN = dropout). All the same length. */
  channels: Record<string, number[]>;
}

/** A deterministic test signal: a slow ramp plus two sinusoids, different per channel. */
export function tarrowSeries(frames: number, rate = 30, start = 1_735_689_600): Series {
  const names = ['moorgate.angle', 'moorgate.freq', 'saltreach-bay.angle'];
  const channels: Record<string, number[]> = {};
  names.forEach((n, c) => {
    const v: number[] = [];
    for (let i = 0; i < frames; i++) {
      const t = i / rate;
      const base = n.endsWith('.freq') ? 60 : c === 0 ? 12 : -8;
      const amp = n.endsWith('.freq') ? 0.002 : 0.8;
      v.push(Number((base + amp * Math.sin(2 * Math.PI * 0.31 * t + c) + 0.1 * amp * Math.cos(2 * Math.PI * 1.3 * t)).toFixed(6)));
    }
    channels[n] = v;
  });
  return { start, rate, channels };
}

export function epochText(t: number): string {
  return String(Number(t.toFixed(6)));
}

export function isoText(t: number): string {
  const whole = Math.floor(t);
  const frac = t - whole;
  const d = new Date(whole * 1000).toISOString().slice(0, 19);
  return `${d}.${Math.round(frac * 1e6).toString().padStart(6, '0')}Z`;
}

export interface CsvOptions {
  time?: 'epoch' | 'iso';
  /** Row index → replacement line text (without newline). */
  replace?: Record<number, string>;
  eol?: string;
}

/** header + one line per frame; NaN values are written as empty cells. */
export function csvText(s: Series, opts: CsvOptions = {}): string {
  const names = Object.keys(s.channels);
  const eol = opts.eol ?? '\n';
  const lines = [['time', ...names].join(',')];
  const n = s.channels[names[0]].length;
  for (let i = 0; i < n; i++) {
    if (opts.replace && i in opts.replace) {
      lines.push(opts.replace[i]);
      continue;
    }
    const t = s.start + i / s.rate;
    const cells = names.map((c) => {
      const v = s.channels[c][i];
      return Number.isNaN(v) ? '' : String(v);
    });
    lines.push([opts.time === 'iso' ? isoText(t) : epochText(t), ...cells].join(','));
  }
  return lines.join(eol) + eol;
}

export interface ComtradeChannelSpec {
  id: string;
  unit: string;
  /** value = a · raw + b */
  a: number;
  b: number;
}

export function channelSpecs(s: Series): ComtradeChannelSpec[] {
  return Object.keys(s.channels).map((id) => {
    if (id.endsWith('.freq')) return { id, unit: 'Hz', a: 1e-6, b: 60 };
    if (id.endsWith('.mw')) return { id, unit: 'MW', a: 0.1, b: 0 };
    return { id, unit: 'deg', a: 1e-3, b: 0 };
  });
}

export interface CfgOptions {
  rev?: 1999 | 2013;
  fileType?: 'ASCII' | 'BINARY' | 'BINARY32' | 'FLOAT32';
  samp?: number;
  endsamp?: number;
  lineFrequency?: number;
  digital?: number;
  /** 2013 time_code, e.g. "0" or "-5h30". */
  timeCode?: string;
  /** Replace whole .cfg lines (0-based) after building. */
  replaceLine?: Record<number, string>;
}

function cfgDate(t: number): string {
  const whole = Math.floor(t);
  const us = Math.round((t - whole) * 1e6);
  const d = new Date(whole * 1000);
  const p = (x: number, n = 2) => String(x).padStart(n, '0');
  return `${p(d.getUTCDate())}/${p(d.getUTCMonth() + 1)}/${d.getUTCFullYear()},${p(d.getUTCHours())}:${p(d.getUTCMinutes())}:${p(d.getUTCSeconds())}.${p(us, 6)}`;
}

export function comtradeCfg(s: Series, opts: CfgOptions = {}): string {
  const specs = channelSpecs(s);
  const rev = opts.rev ?? 1999;
  const nD = opts.digital ?? 0;
  const frames = s.channels[specs[0].id].length;
  const lines: string[] = [];
  lines.push(`Tarrow Moorgate PMU,MG-1,${rev}`);
  lines.push(`${specs.length + nD},${specs.length}A,${nD}D`);
  specs.forEach((c, i) => lines.push(`${i + 1},${c.id},,,${c.unit},${c.a},${c.b},0,-32767,32767,1,1,P`));
  for (let d = 1; d <= nD; d++) lines.push(`${d},breaker-${d},,,0`);
  lines.push(String(opts.lineFrequency ?? 60));
  lines.push('1');
  lines.push(`${opts.samp ?? s.rate},${opts.endsamp ?? frames}`);
  lines.push(cfgDate(s.start));
  lines.push(cfgDate(s.start));
  lines.push(opts.fileType ?? 'ASCII');
  lines.push('1');
  if (rev === 2013) {
    lines.push(`${opts.timeCode ?? '0'},${opts.timeCode ?? '0'}`);
    lines.push('3,0');
  }
  if (opts.replaceLine) for (const [k, v] of Object.entries(opts.replaceLine)) lines[Number(k)] = v;
  return lines.join('\r\n') + '\r\n';
}

function raw(spec: ComtradeChannelSpec, v: number): number {
  return Math.round((v - spec.b) / spec.a);
}

export interface DatOptions {
  digital?: number;
  /** Row index → replacement line (ASCII). */
  replace?: Record<number, string>;
  /** Rows to leave out (ASCII and binary). */
  drop?: number[];
}

export function comtradeAsciiDat(s: Series, opts: DatOptions = {}): string {
  const specs = channelSpecs(s);
  const n = s.channels[specs[0].id].length;
  const nD = opts.digital ?? 0;
  const lines: string[] = [];
  for (let i = 0; i < n; i++) {
    if (opts.drop?.includes(i)) continue;
    if (opts.replace && i in opts.replace) {
      lines.push(opts.replace[i]);
      continue;
    }
    const ts = Math.round((i / s.rate) * 1e6);
    const vals = specs.map((c) => {
      const v = s.channels[c.id][i];
      return Number.isNaN(v) ? '' : String(raw(c, v));
    });
    const dig = Array.from({ length: nD }, () => '0');
    lines.push([i + 1, ts, ...vals, ...dig].join(','));
  }
  return lines.join('\r\n') + '\r\n';
}

/** BINARY (int16), BINARY32 (int32) or FLOAT32 records, little-endian. */
export function comtradeBinaryDat(
  s: Series,
  fileType: 'BINARY' | 'BINARY32' | 'FLOAT32' = 'BINARY',
  opts: DatOptions = {},
): Buffer {
  const specs = channelSpecs(s);
  const n = s.channels[specs[0].id].length;
  const nD = opts.digital ?? 0;
  const width = fileType === 'BINARY' ? 2 : 4;
  const size = 8 + specs.length * width + 2 * Math.ceil(nD / 16);
  const rows = [...Array(n).keys()].filter((i) => !opts.drop?.includes(i));
  const buf = Buffer.alloc(rows.length * size);
  rows.forEach((i, r) => {
    const at = r * size;
    buf.writeUInt32LE(i + 1, at);
    buf.writeUInt32LE(Math.round((i / s.rate) * 1e6), at + 4);
    specs.forEach((c, k) => {
      const v = s.channels[c.id][i];
      const o = at + 8 + k * width;
      if (fileType === 'BINARY') buf.writeInt16LE(Number.isNaN(v) ? -0x8000 : raw(c, v), o);
      else if (fileType === 'BINARY32') buf.writeInt32LE(Number.isNaN(v) ? -0x80000000 : raw(c, v), o);
      else buf.writeFloatLE(Number.isNaN(v) ? NaN : (v - c.b) / c.a, o);
    });
  });
  return buf;
}

/** Single-file COMTRADE (2013): CFG, INF, HDR sections, then the DAT section. */
export function comtradeCff(cfg: string, dat: string | Buffer, fileType: string): Buffer {
  const head =
    `--- file type: CFG ---\r\n${cfg}` +
    `--- file type: INF ---\r\n[Tarrow]\r\nnote=invented demo data\r\n` +
    `--- file type: HDR ---\r\nMoorgate PMU test record\r\n`;
  const data = typeof dat === 'string' ? Buffer.from(dat) : dat;
  const marker = `--- file type: DAT ${fileType}: ${data.length} ---\r\n`;
  return Buffer.concat([Buffer.from(head + marker), data]);
}
