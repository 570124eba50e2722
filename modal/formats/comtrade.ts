// COMTRADE (standard: IEEE C37.111-2013 / IEC 60255-24) writer and reader for PMU records.
// Pure: strings and Uint8Array in and out, no I/O. Field splitting of the comma-separated .cfg and
// ASCII .dat is csv-parse's job.
//
// .cfg as written (one item per line):
//   station_name,rec_dev_id,rev_year            e.g. Tarrow Interconnection,keel,2013
//   TT,##A,##D                                  e.g. 22,22A,0D
//   An,ch_id,ph,ccbm,uu,a,b,skew,min,max,primary,secondary,PS   (one per analog channel)
//   lf                                          line frequency, Hz
//   nrates / samp,endsamp                       one rate: the PMU reporting rate
//   dd/mm/yyyy,hh:mm:ss.ssssss                  first sample time
//   dd/mm/yyyy,hh:mm:ss.ssssss                  trigger time
//   ft                                          ASCII or BINARY
//   timemult                                    multiplier of the .dat time stamps (µs)
//   time_code,local_code                        0,0 (times are UTC)
//   tmq_code,leapsec                            0,0
// .dat rows: sample number, time stamp (µs × timemult), the analog raw values; value = a·raw + b
// (primary units when PS = P; secondary values are scaled by primary/secondary). Missing analog
// data: 99999 in ASCII, −32768 (0x8000) in BINARY (standard).
import { parse } from 'csv-parse/sync';
import { ModalInputError } from '../errors';
import type { SampledRecord } from '../types';
import { NUMBER_RE, checkRecordForWriting, fmtNum, isStandardRate, standardRatesText, type NominalHz } from './common';
import { FormatError } from './errors';

export type ComtradeFileType = 'ASCII' | 'BINARY';

export interface ComtradeWriteOptions {
  /** Station name (default 'Tarrow Interconnection'). */
  station?: string;
  /** Recording device id (default 'keel'). */
  deviceId?: string;
  fileType?: ComtradeFileType;
  /** Epoch seconds of the trigger (default: the first sample). */
  triggerTime?: number;
  /** Unit per channel; default from the name: *.angle deg, *.freq Hz, *.mw MW, else blank. */
  units?: Record<string, string>;
  /** Line frequency, Hz (default 60). */
  lineFrequency?: NominalHz;
}

export interface ComtradeFiles {
  cfg: string;
  dat: Uint8Array;
}

const ASCII_MAX = 99998;
const ASCII_MISSING = 99999;
const INT16_MAX = 32767;
const INT16_MISSING = -32768;

function unitOf(name: string, units?: Record<string, string>): string {
  if (units && units[name] !== undefined) return units[name];
  if (name.endsWith('.angle')) return 'deg';
  if (name.endsWith('.freq')) return 'Hz';
  if (name.endsWith('.mw')) return 'MW';
  return '';
}

/** dd/mm/yyyy,hh:mm:ss.ssssss of epoch seconds (UTC), rounded to the microsecond. */
export function comtradeTime(t: number): string {
  const us = Math.round(t * 1e6);
  const sec = Math.floor(us / 1e6);
  const frac = us - sec * 1e6;
  const d = new Date(sec * 1000);
  const p2 = (x: number) => String(x).padStart(2, '0');
  return (
    `${p2(d.getUTCDate())}/${p2(d.getUTCMonth() + 1)}/${d.getUTCFullYear()},` +
    `${p2(d.getUTCHours())}:${p2(d.getUTCMinutes())}:${p2(d.getUTCSeconds())}.${String(frac).padStart(6, '0')}`
  );
}

function checkField(text: string, what: string): string {
  if (/[,"\r\n]/.test(text)) throw new ModalInputError(`writeComtrade: ${what} ${JSON.stringify(text)} holds a comma, quote or line break`);
  return text;
}

/** Writes a record as a COMTRADE 2013 .cfg/.dat pair. */
export function writeComtrade(record: SampledRecord, options: ComtradeWriteOptions = {}): ComtradeFiles {
  const n = checkRecordForWriting(record, 'writeComtrade');
  const fileType = options.fileType ?? 'ASCII';
  if (fileType !== 'ASCII' && fileType !== 'BINARY') throw new ModalInputError(`writeComtrade: fileType must be ASCII or BINARY, got ${String(fileType)}`);
  const station = checkField(options.station ?? 'Tarrow Interconnection', 'station');
  const device = checkField(options.deviceId ?? 'keel', 'deviceId');
  const lf = options.lineFrequency ?? 60;
  const rawMax = fileType === 'ASCII' ? ASCII_MAX : INT16_MAX;
  const nA = record.channels.length;

  // Per-channel scaling so the data span fills the raw range: value = a·raw + b.
  const scale = record.channels.map((c) => {
    let lo = Infinity;
    let hi = -Infinity;
    for (const v of c.values) {
      if (!Number.isFinite(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (lo === Infinity) return { a: 1, b: 0 };
    const b = 0.5 * (hi + lo);
    const half = 0.5 * (hi - lo);
    const a = half > 0 ? half / rawMax : Math.max(Math.abs(b), 1) * 1e-9;
    // Quantise with exactly the numbers the .cfg prints, so a reader reproduces a·raw + b.
    return { a: Number(a.toPrecision(15)), b: Number(b.toPrecision(15)) };
  });
  const raw = (k: number, v: number): number => {
    if (!Number.isFinite(v)) return fileType === 'ASCII' ? ASCII_MISSING : INT16_MISSING;
    const r = Math.round((v - scale[k].b) / scale[k].a);
    return Math.max(-rawMax, Math.min(rawMax, r));
  };

  const durationUs = (n / record.rate) * 1e6;
  const timemult = Math.max(1, Math.ceil(durationUs / 4e9));
  const cfg: string[] = [
    `${station},${device},2013`,
    `${nA},${nA}A,0D`,
    ...record.channels.map((c, k) => {
      const name = c.name;
      const dot = name.indexOf('.');
      const ccbm = dot > 0 ? name.slice(0, dot) : '';
      const unit = checkField(unitOf(name, options.units), `unit of ${name}`);
      return `${k + 1},${name},,${ccbm},${unit},${scale[k].a.toPrecision(15)},${scale[k].b.toPrecision(15)},0,${-rawMax},${rawMax},1,1,P`;
    }),
    String(lf),
    '1',
    `${fmtNum(record.rate)},${n}`,
    comtradeTime(record.startTime),
    comtradeTime(options.triggerTime ?? record.startTime),
    fileType,
    String(timemult),
    '0,0',
    '0,0',
  ];
  const stamp = (i: number) => Math.round((i * 1e6) / record.rate / timemult);
  let dat: Uint8Array;
  if (fileType === 'ASCII') {
    const lines: string[] = [];
    for (let i = 0; i < n; i++) {
      const f: (string | number)[] = [i + 1, stamp(i)];
      for (let k = 0; k < nA; k++) f.push(raw(k, record.channels[k].values[i]));
      lines.push(f.join(','));
    }
    dat = new TextEncoder().encode(lines.join('\r\n') + '\r\n');
  } else {
    const size = 8 + 2 * nA;
    dat = new Uint8Array(size * n);
    const view = new DataView(dat.buffer);
    for (let i = 0; i < n; i++) {
      const o = i * size;
      view.setUint32(o, i + 1, true);
      view.setUint32(o + 4, stamp(i), true);
      for (let k = 0; k < nA; k++) view.setInt16(o + 8 + 2 * k, raw(k, record.channels[k].values[i]), true);
    }
  }
  return { cfg: cfg.join('\r\n') + '\r\n', dat };
}

// ---------------------------------------------------------------------------------------------
// Reader

interface AnalogChannel {
  name: string;
  unit: string;
  a: number;
  b: number;
  factor: number;
}

export interface ComtradeHeader {
  station: string;
  deviceId: string;
  revYear: string;
  analog: AnalogChannel[];
  digitalCount: number;
  lineFrequency: number;
  rate: number;
  samples: number;
  startTime: number;
  triggerTime: number;
  fileType: 'ASCII' | 'BINARY' | 'BINARY32' | 'FLOAT32';
  timemult: number;
}

export interface ComtradeReadOptions {
  /** Refuse sampling rates that are not PMU reporting rates for the file's line frequency (default true). */
  requireStandardRate?: boolean;
}

export interface ParsedComtrade {
  record: SampledRecord;
  header: ComtradeHeader;
  /** Missing-data samples per channel. */
  dropouts: Record<string, number>;
}

const cfgErr = (line: number, msg: string) => new FormatError(`cfg line ${line}: ${msg}`, 'comtrade', line);

function parseComtradeTime(fields: string[], line: number, what: string): number {
  const [date, time] = fields;
  const dm = /^(\d{1,2})\/(\d{1,2})\/(\d{4})$/.exec(date ?? '');
  const tm = /^(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)$/.exec(time ?? '');
  if (!dm || !tm) throw cfgErr(line, `${what} "${fields.join(',')}" is not dd/mm/yyyy,hh:mm:ss.ssssss`);
  const [D, M, Y] = [Number(dm[1]), Number(dm[2]), Number(dm[3])];
  const [h, m] = [Number(tm[1]), Number(tm[2])];
  const s = Number(tm[3]);
  const whole = Math.floor(s);
  const ms = Date.UTC(Y, M - 1, D, h, m, whole);
  const back = new Date(ms);
  if (back.getUTCDate() !== D || back.getUTCMonth() !== M - 1 || h > 23 || m > 59 || s >= 60) {
    throw cfgErr(line, `${what} "${fields.join(',')}" is not a valid date and time`);
  }
  const fracText = tm[3].includes('.') ? tm[3].slice(tm[3].indexOf('.')) : '';
  return ms / 1000 + (fracText ? Number(`0${fracText}`) : 0);
}

function num(text: string | undefined, line: number, what: string): number {
  const t = (text ?? '').trim();
  if (!NUMBER_RE.test(t)) throw cfgErr(line, `${what} "${text ?? ''}" is not a number`);
  return Number(t);
}

/** Parses a .cfg text (any revision: 1991, 1999, 2013) into its header. */
export function parseComtradeCfg(cfgText: string): ComtradeHeader {
  if (typeof cfgText !== 'string') throw new FormatError('The .cfg input must be text', 'comtrade');
  let rows: { info: { lines: number }; record: string[] }[];
  try {
    rows = parse(cfgText, { info: true, relax_column_count: true, skip_empty_lines: true, trim: true, bom: true, quote: false }) as unknown as typeof rows;
  } catch (e) {
    throw new FormatError(`the .cfg is not readable (${(e as Error).message})`, 'comtrade');
  }
  let i = 0;
  const next = (what: string): { line: number; f: string[] } => {
    const r = rows[i++];
    if (!r) throw new FormatError(`the .cfg ends early: ${what} is missing`, 'comtrade');
    return { line: r.info.lines, f: r.record };
  };
  const l1 = next('the station line');
  if (l1.f.length < 2 || l1.f[0] === '') throw cfgErr(l1.line, 'expected station_name,rec_dev_id,rev_year');
  const [station, deviceId, revYear = '1991'] = l1.f;

  const l2 = next('the channel counts');
  const tt = /^\d+$/.exec(l2.f[0] ?? '');
  const aa = /^(\d+)A$/i.exec(l2.f[1] ?? '');
  const dd = /^(\d+)D$/i.exec(l2.f[2] ?? '');
  if (!tt || !aa || !dd) throw cfgErr(l2.line, `expected channel counts like 22,22A,0D, found "${l2.f.join(',')}"`);
  const nA = Number(aa[1]);
  const nD = Number(dd[1]);
  if (Number(tt[0]) !== nA + nD) throw cfgErr(l2.line, `total channels ${tt[0]} is not ${nA}A + ${nD}D`);
  if (nA === 0) throw cfgErr(l2.line, 'the file has no analog channels');

  const analog: AnalogChannel[] = [];
  const names = new Set<string>();
  for (let k = 0; k < nA; k++) {
    const { line, f } = next(`analog channel ${k + 1}`);
    if (f.length < 10) throw cfgErr(line, `analog channel line needs at least 10 fields (An,ch_id,ph,ccbm,uu,a,b,skew,min,max), found ${f.length}`);
    if (Number(f[0]) !== k + 1) throw cfgErr(line, `expected analog channel ${k + 1}, found index "${f[0]}"`);
    const name = f[1];
    if (!name) throw cfgErr(line, `analog channel ${k + 1} has no name (ch_id)`);
    if (names.has(name)) throw cfgErr(line, `channel "${name}" appears twice`);
    names.add(name);
    const a = num(f[5], line, `multiplier a of ${name}`);
    const b = num(f[6], line, `offset b of ${name}`);
    let factor = 1;
    if (f.length >= 13 && (f[12] ?? '').toUpperCase() === 'S') {
      const primary = num(f[10], line, `primary of ${name}`);
      const secondary = num(f[11], line, `secondary of ${name}`);
      if (secondary === 0) throw cfgErr(line, `secondary of ${name} is 0`);
      factor = primary / secondary;
    }
    analog.push({ name, unit: f[4] ?? '', a, b, factor });
  }
  for (let k = 0; k < nD; k++) next(`digital channel ${k + 1}`);
  const lfLine = next('the line frequency');
  const lineFrequency = num(lfLine.f[0], lfLine.line, 'line frequency');
  const nrLine = next('the number of sampling rates');
  const nrates = num(nrLine.f[0], nrLine.line, 'number of sampling rates');
  if (nrates > 1) throw cfgErr(nrLine.line, `the file has ${nrates} sampling rates; Keel needs one uniform rate`);
  const sr = next('the sampling rate line');
  const rate = num(sr.f[0], sr.line, 'sampling rate');
  const samples = num(sr.f[1], sr.line, 'end sample number');
  if (nrates === 0 || rate === 0) throw cfgErr(sr.line, 'the file has no fixed sampling rate (nrates 0); Keel needs one uniform rate');
  if (!(rate > 0)) throw cfgErr(sr.line, `sampling rate ${fmtNum(rate)} must be positive`);
  if (!(Number.isInteger(samples) && samples > 0)) throw cfgErr(sr.line, `end sample number ${fmtNum(samples)} must be a positive integer`);
  const st = next('the first sample time');
  const startTime = parseComtradeTime(st.f, st.line, 'first sample time');
  const tr = next('the trigger time');
  const triggerTime = parseComtradeTime(tr.f, tr.line, 'trigger time');
  const ftLine = next('the file type');
  const ft = (ftLine.f[0] ?? '').toUpperCase();
  if (ft !== 'ASCII' && ft !== 'BINARY' && ft !== 'BINARY32' && ft !== 'FLOAT32') {
    throw cfgErr(ftLine.line, `file type "${ftLine.f[0] ?? ''}" is not ASCII, BINARY, BINARY32 or FLOAT32`);
  }
  let timemult = 1;
  if (i < rows.length) {
    const tmLine = next('the time multiplier');
    timemult = num(tmLine.f[0], tmLine.line, 'time multiplier');
  }
  return {
    station,
    deviceId: deviceId ?? '',
    revYear,
    analog,
    digitalCount: nD,
    lineFrequency,
    rate,
    samples,
    startTime,
    triggerTime,
    fileType: ft,
    timemult,
  };
}

/** Parses a .cfg text and its .dat bytes (ASCII or binary) into a record. */
export function parseComtrade(cfgText: string, dat: Uint8Array, options: ComtradeReadOptions = {}): SampledRecord {
  return parseComtradeDetailed(cfgText, dat, options).record;
}

export function parseComtradeDetailed(cfgText: string, dat: Uint8Array, options: ComtradeReadOptions = {}): ParsedComtrade {
  const header = parseComtradeCfg(cfgText);
  if (options.requireStandardRate ?? true) {
    const lf = header.lineFrequency;
    if (lf !== 50 && lf !== 60) throw new FormatError(`cfg: line frequency ${fmtNum(lf)} Hz is neither 50 nor 60`, 'comtrade');
    if (!isStandardRate(header.rate, lf)) {
      throw new FormatError(
        `cfg: sampling rate ${fmtNum(header.rate)} samples/s is not a standard reporting rate for a ${lf} Hz system (${standardRatesText(lf)})`,
        'comtrade',
      );
    }
  }
  if (!(dat instanceof Uint8Array)) throw new FormatError('The .dat input must be bytes (Uint8Array)', 'comtrade');
  const nA = header.analog.length;
  const N = header.samples;
  const values = header.analog.map(() => new Float64Array(N));
  const dropouts: Record<string, number> = Object.fromEntries(header.analog.map((c) => [c.name, 0]));
  const put = (k: number, i: number, rawV: number, missing: boolean) => {
    if (missing) {
      values[k][i] = NaN;
      dropouts[header.analog[k].name]++;
    } else {
      const c = header.analog[k];
      values[k][i] = (c.a * rawV + c.b) * c.factor;
    }
  };
  if (header.fileType === 'ASCII') {
    const text = new TextDecoder('utf-8', { fatal: false }).decode(dat);
    let rows: { info: { lines: number }; record: string[] }[];
    try {
      rows = parse(text, { info: true, relax_column_count: true, skip_empty_lines: true, trim: true, quote: false }) as unknown as typeof rows;
    } catch (e) {
      throw new FormatError(`dat: the file is not readable (${(e as Error).message})`, 'comtrade');
    }
    if (rows.length !== N) throw new FormatError(`dat: the .cfg announces ${N} samples, the .dat holds ${rows.length} rows`, 'comtrade');
    const nD = header.digitalCount;
    let prevN = -Infinity;
    for (let i = 0; i < N; i++) {
      const { info, record } = rows[i];
      const line = info.lines;
      if (record.length < 2 + nA + nD) {
        throw new FormatError(`dat line ${line}: expected ${2 + nA + nD} fields (sample number, time stamp, ${nA} analog${nD ? `, ${nD} digital` : ''}), found ${record.length}`, 'comtrade', line);
      }
      if (!NUMBER_RE.test(record[0])) throw new FormatError(`dat line ${line}: sample number "${record[0]}" is not a number`, 'comtrade', line);
      const sn = Number(record[0]);
      if (sn <= prevN) throw new FormatError(`dat line ${line}: sample number ${sn} does not increase (previous ${prevN})`, 'comtrade', line);
      prevN = sn;
      for (let k = 0; k < nA; k++) {
        const f = record[2 + k];
        if (f === '') {
          put(k, i, 0, true);
          continue;
        }
        if (!NUMBER_RE.test(f)) {
          throw new FormatError(`dat line ${line}: value "${f}" of channel ${header.analog[k].name} is not a number`, 'comtrade', line);
        }
        const v = Number(f);
        put(k, i, v, v === ASCII_MISSING);
      }
    }
  } else {
    const width = header.fileType === 'BINARY' ? 2 : 4;
    const size = 8 + width * nA + 2 * Math.ceil(header.digitalCount / 16);
    if (dat.length !== size * N) {
      throw new FormatError(
        `dat: a ${header.fileType} file of ${N} samples × ${size} bytes should hold ${size * N} bytes, found ${dat.length}`,
        'comtrade',
      );
    }
    const view = new DataView(dat.buffer, dat.byteOffset, dat.byteLength);
    let prevN = -1;
    for (let i = 0; i < N; i++) {
      const o = i * size;
      const sn = view.getUint32(o, true);
      if (i > 0 && sn <= prevN) throw new FormatError(`dat sample ${i + 1}: sample number ${sn} does not increase (previous ${prevN})`, 'comtrade');
      prevN = sn;
      for (let k = 0; k < nA; k++) {
        const p = o + 8 + width * k;
        if (header.fileType === 'BINARY') {
          const r = view.getInt16(p, true);
          put(k, i, r, r === INT16_MISSING);
        } else if (header.fileType === 'BINARY32') {
          const r = view.getInt32(p, true);
          put(k, i, r, r === -2147483648);
        } else {
          const r = view.getFloat32(p, true);
          put(k, i, r, !Number.isFinite(r));
        }
      }
    }
  }
  return {
    record: { startTime: header.startTime, rate: header.rate, channels: header.analog.map((c, k) => ({ name: c.name, values: values[k] })) },
    header,
    dropouts,
  };
}

// ---------------------------------------------------------------------------------------------
// Single-file form (.cff, IEEE C37.111-2013): sections introduced by `--- file type: CFG ---`,
// `--- file type: INF ---`, `--- file type: HDR ---`, `--- file type: DAT ASCII: <bytes> ---` or
// `--- file type: DAT BINARY: <bytes> ---`.

const SECTION_RE = /^---\s*file type:\s*(CFG|INF|HDR|DAT\s+(ASCII|BINARY|BINARY32|FLOAT32))\s*(?::\s*(\d+))?\s*---\s*$/i;

/** Writes a record as a single .cff text (ASCII data). */
export function writeCff(record: SampledRecord, options: Omit<ComtradeWriteOptions, 'fileType'> = {}): string {
  const { cfg, dat } = writeComtrade(record, { ...options, fileType: 'ASCII' });
  return `--- file type: CFG ---\r\n${cfg}--- file type: DAT ASCII: ${dat.length} ---\r\n${new TextDecoder().decode(dat)}`;
}

/**
 * Parses the single-file form. Text input must hold ASCII data; pass the file's bytes to read a
 * .cff with binary data (the bytes after its DAT marker are taken as they are).
 */
export function parseCff(input: string | Uint8Array, options: ComtradeReadOptions = {}): SampledRecord {
  // latin1 maps bytes 1:1 to characters, so character offsets are byte offsets.
  const text = typeof input === 'string' ? input : new TextDecoder('latin1').decode(input);
  let pos = 0;
  let cfg: string | null = null;
  let datStart = -1;
  let datType = '';
  let datBytes: number | null = null;
  let cfgStart = -1;
  while (pos < text.length) {
    let end = text.indexOf('\n', pos);
    if (end < 0) end = text.length;
    const line = text.slice(pos, end).replace(/\r$/, '');
    const m = SECTION_RE.exec(line);
    if (m) {
      const kind = m[1].toUpperCase();
      if (cfgStart >= 0 && cfg === null) cfg = text.slice(cfgStart, pos);
      if (kind === 'CFG') cfgStart = end + 1;
      else if (kind.startsWith('DAT')) {
        datType = (m[2] ?? '').toUpperCase();
        datStart = end + 1;
        datBytes = m[3] !== undefined ? Number(m[3]) : null;
        break;
      }
    }
    pos = end + 1;
  }
  if (cfgStart < 0 || cfg === null) throw new FormatError('cff: no "--- file type: CFG ---" section before the data', 'comtrade');
  if (datStart < 0) throw new FormatError('cff: no "--- file type: DAT … ---" section', 'comtrade');
  if (datType !== 'ASCII' && typeof input === 'string') {
    throw new FormatError(`cff: the data section is ${datType}; pass the file's bytes, not text`, 'comtrade');
  }
  let datEnd = text.length;
  if (datBytes !== null) {
    if (datStart + datBytes > text.length) throw new FormatError(`cff: the DAT section announces ${datBytes} bytes, the file holds ${text.length - datStart}`, 'comtrade');
    datEnd = datStart + datBytes;
  }
  const datView =
    typeof input === 'string' ? new TextEncoder().encode(text.slice(datStart, datEnd)) : input.subarray(datStart, datEnd);
  const header = parseComtradeCfg(cfg);
  if (header.fileType !== datType) {
    throw new FormatError(`cff: the CFG section says ${header.fileType}, the DAT section ${datType}`, 'comtrade');
  }
  return parseComtradeDetailed(cfg, datView, options).record;
}
