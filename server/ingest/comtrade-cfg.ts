// The COMTRADE configuration file (.cfg), IEEE C37.111-1999 and -2013 (standard): station line,
// channel counts, one line per analog channel (id, phase, circuit, unit, multiplier a, offset b,
// skew, min, max, primary, secondary, P/S), one per digital channel, line frequency, sampling
// rates, first-sample and trigger times, data file type, time multiplier and (2013) the time
// code lines. The .cfg is a small metadata file and is read whole; the .dat is streamed.
import { FileRefusedError } from './errors';
import { hasInvalidUtf8, checkTextHead } from './encoding';
import { quote } from './text-values';

export type DatFileType = 'ASCII' | 'BINARY' | 'BINARY32' | 'FLOAT32';

export interface AnalogChannel {
  /** 1-based channel index An. */
  index: number;
  id: string;
  phase: string;
  circuit: string;
  unit: string;
  /**
   * value = a · raw + b (standard), already multiplied by primary/secondary when the channel's
   * P/S flag says the values are secondary (so that stored values are primary quantities).
   */
  a: number;
  b: number;
}

export interface ComtradeConfig {
  station: string;
  deviceId: string;
  revYear: 1999 | 2013;
  analog: AnalogChannel[];
  digitalCount: number;
  lineFrequency: number;
  /** Samples per second (0: the timestamps give the times). */
  sampleRate: number;
  /** Last sample number of the data file (endsamp of the last rate). */
  lastSample: number;
  /** Line of the .cfg holding the (first) sample-rate line, for messages. */
  rateLine: number;
  /** Time of the first data sample, epoch seconds UTC (the 2013 time_code applied). */
  startTime: number;
  fileType: DatFileType;
  /** Multiplier of the .dat timestamps, which are in microseconds. */
  timeMultiplier: number;
}

/** Largest .cfg accepted: a configuration with a few thousand channels is far below it. */
export const MAX_CFG_BYTES = 1 << 20;

/**
 * Parses .cfg text. `label` is the file name used in messages ("event.cfg"); `lineOffset` shifts
 * line numbers when the configuration is a section of a .cff file.
 */
export function parseComtradeConfig(text: string, label: string, lineOffset = 0): ComtradeConfig {
  const lines = text.split(/\r?\n/);
  // A final line break leaves one empty entry; trailing blank lines carry no information.
  while (lines.length > 0 && lines[lines.length - 1].trim() === '') lines.pop();
  let i = 0;
  const at = (k: number) => `${label} line ${k + 1 + lineOffset}`;
  const fail = (k: number, reason: string): never => {
    throw new FileRefusedError(at(k), reason);
  };
  const next = (what: string): string[] => {
    if (i >= lines.length) fail(i, `the configuration ends early: expected ${what}`);
    const raw = lines[i];
    if (hasInvalidUtf8(raw)) fail(i, 'holds bytes that are not UTF-8 or ASCII');
    i++;
    return raw.split(',').map((f) => f.trim());
  };
  const num = (k: number, field: string, what: string): number => {
    if (!/^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(field)) fail(k, `${what} ${quote(field)} is not a number`);
    const v = Number(field);
    if (!Number.isFinite(v)) fail(k, `${what} ${quote(field)} is out of range`);
    return v;
  };
  const int = (k: number, field: string, what: string): number => {
    if (!/^\d+$/.test(field)) fail(k, `${what} ${quote(field)} is not a whole number`);
    const v = Number(field);
    if (!Number.isSafeInteger(v)) fail(k, `${what} ${quote(field)} is out of range`);
    return v;
  };

  if (lines.length === 0) fail(0, 'the configuration file is empty');
  const station = next('the station line');
  if (station.length < 3 || station[2] === '') {
    fail(0, 'the station line has no revision year (the 1991 edition is not supported; Keel reads the 1999 and 2013 editions)');
  }
  const rev = station[2];
  if (rev !== '1999' && rev !== '2013') {
    fail(0, `revision year ${quote(rev)} is not supported; Keel reads the 1999 and 2013 editions of IEEE C37.111`);
  }
  const revYear = Number(rev) as 1999 | 2013;

  const counts = next('the channel-count line "TT,##A,##D"');
  const countsLine = i - 1;
  if (counts.length < 3) fail(countsLine, 'the channel-count line must read "TT,##A,##D" (total, analog, digital)');
  const total = int(countsLine, counts[0], 'total channel count');
  const am = /^(\d+)A$/i.exec(counts[1]);
  const dm = /^(\d+)D$/i.exec(counts[2]);
  if (!am) fail(countsLine, `analog count ${quote(counts[1])} must be a number followed by A (e.g. 12A)`);
  if (!dm) fail(countsLine, `digital count ${quote(counts[2])} must be a number followed by D (e.g. 2D)`);
  const nA = Number(am![1]);
  const nD = Number(dm![1]);
  if (nA + nD !== total) fail(countsLine, `total channel count ${total} is not ${nA}A + ${nD}D = ${nA + nD}`);
  if (nA === 0) fail(countsLine, 'the file has no analog channels, so nothing to store');

  const analog: AnalogChannel[] = [];
  const ids = new Map<string, number>();
  for (let c = 1; c <= nA; c++) {
    const f = next(`analog channel line ${c} of ${nA}`);
    const k = i - 1;
    if (f.length < 10) {
      fail(k, `analog channel line has ${f.length} fields; expected 13 (An,ch_id,ph,ccbm,uu,a,b,skew,min,max,primary,secondary,PS)`);
    }
    const index = int(k, f[0], 'analog channel index');
    if (index !== c) fail(k, `analog channel index ${index} out of order; expected ${c}`);
    const id = f[1];
    if (id === '') fail(k, `analog channel ${c} has no name (ch_id)`);
    const prev = ids.get(id);
    if (prev !== undefined) fail(k, `analog channel name ${quote(id)} is used twice (channels ${prev} and ${c})`);
    ids.set(id, c);
    const a = num(k, f[5], `analog channel ${c} multiplier a`);
    const b = num(k, f[6], `analog channel ${c} offset b`);
    if (a === 0) fail(k, `analog channel ${c} multiplier a is 0, which would make every value ${b}`);
    let factor = 1;
    if (f.length >= 13 && f[12].toUpperCase() === 'S') {
      const primary = num(k, f[10], `analog channel ${c} primary ratio`);
      const secondary = num(k, f[11], `analog channel ${c} secondary ratio`);
      if (secondary === 0) fail(k, `analog channel ${c} secondary ratio is 0`);
      factor = primary / secondary;
      if (!Number.isFinite(a * factor) || !Number.isFinite(b * factor)) {
        fail(k, `analog channel ${c} primary/secondary ratio ${f[10]}/${f[11]} puts the multiplier out of range`);
      }
    }
    analog.push({ index, id, phase: f[2], circuit: f[3], unit: f[4], a: a * factor, b: b * factor });
  }
  for (let c = 1; c <= nD; c++) {
    const f = next(`digital channel line ${c} of ${nD}`);
    const k = i - 1;
    if (f.length < 2) fail(k, 'a digital channel line needs at least "Dn,ch_id"');
    const index = int(k, f[0], 'digital channel index');
    if (index !== c) fail(k, `digital channel index ${index} out of order; expected ${c}`);
  }

  const lf = next('the line frequency');
  const lineFrequency = num(i - 1, lf[0], 'line frequency');
  if (!(lineFrequency > 0)) fail(i - 1, `line frequency ${lf[0]} Hz must be positive`);

  const nr = next('the number of sampling rates');
  const nrates = int(i - 1, nr[0], 'number of sampling rates nrates');
  let sampleRate = 0;
  let lastSample = 0;
  const rateLine = i;
  for (let r = 0; r < Math.max(1, nrates); r++) {
    const f = next('a sampling-rate line "samp,endsamp"');
    const k = i - 1;
    if (f.length < 2) fail(k, 'a sampling-rate line must read "samp,endsamp"');
    const samp = num(k, f[0], 'sample rate samp');
    const endsamp = int(k, f[1], 'last sample number endsamp');
    if (samp < 0) fail(k, `sample rate ${f[0]} must not be negative`);
    if (r > 0 && samp !== sampleRate) {
      fail(k, `a second sampling rate (${f[0]} after ${sampleRate} samples/s): Keel takes one reporting rate per file`);
    }
    if (nrates === 0 && samp !== 0) fail(k, `nrates is 0 (times from timestamps) but samp is ${f[0]}`);
    sampleRate = samp;
    lastSample = endsamp;
  }
  if (lastSample < 1) fail(i - 1, 'endsamp is 0: the configuration announces no samples');

  const startFields = next('the first-sample time "dd/mm/yyyy,hh:mm:ss.ssssss"');
  const startLocal = parseCfgTime(startFields, i - 1, fail);
  next('the trigger time "dd/mm/yyyy,hh:mm:ss.ssssss"');

  const ftLine = next('the data file type (ASCII, BINARY, BINARY32 or FLOAT32)');
  const ft = ftLine[0].toUpperCase();
  if (ft !== 'ASCII' && ft !== 'BINARY' && ft !== 'BINARY32' && ft !== 'FLOAT32') {
    fail(i - 1, `data file type ${quote(ftLine[0])} must be ASCII, BINARY, BINARY32 or FLOAT32`);
  }
  if (revYear === 1999 && ft !== 'ASCII' && ft !== 'BINARY') {
    fail(i - 1, `data file type ${ft} needs revision year 2013 on line 1`);
  }

  let timeMultiplier = 1;
  if (i < lines.length) {
    const tm = next('the time multiplier');
    timeMultiplier = num(i - 1, tm[0], 'time multiplier timemult');
    if (!(timeMultiplier > 0)) fail(i - 1, `time multiplier ${tm[0]} must be positive`);
  } else if (revYear === 2013) {
    fail(i, 'the configuration ends early: expected the time multiplier');
  }

  // 2013: time_code is the offset of the recorder's local time from UTC ("-5h30"): UTC = local − offset.
  let offsetSeconds = 0;
  if (revYear === 2013 && i < lines.length) {
    const tc = next('the time-code line "time_code,local_code"');
    const m = /^([+-]?)(\d{1,2})(?:h(\d{2}))?$/.exec(tc[0]);
    if (!m) fail(i - 1, `time_code ${quote(tc[0])} must look like 0, +1, -5h30`);
    const sign = m![1] === '-' ? -1 : 1;
    offsetSeconds = sign * (Number(m![2]) * 3600 + Number(m![3] ?? 0) * 60);
  }

  return {
    station: station[0],
    deviceId: station[1] ?? '',
    revYear,
    analog,
    digitalCount: nD,
    lineFrequency,
    sampleRate,
    lastSample,
    rateLine: rateLine + 1 + lineOffset,
    startTime: startLocal - offsetSeconds,
    fileType: ft as DatFileType,
    timeMultiplier,
  };
}

function parseCfgTime(f: string[], k: number, fail: (k: number, reason: string) => never): number {
  const text = f.join(',');
  if (f.length < 2) fail(k, `time ${quote(text)} must read dd/mm/yyyy,hh:mm:ss.ssssss`);
  const d = /^(\d{1,2})\/(\d{1,2})\/(\d{4})$/.exec(f[0]);
  const t = /^(\d{1,2}):(\d{2}):(\d{2}(?:\.\d+)?)$/.exec(f[1]);
  if (!d || !t) fail(k, `time ${quote(text)} must read dd/mm/yyyy,hh:mm:ss.ssssss`);
  const day = Number(d![1]);
  const month = Number(d![2]);
  const year = Number(d![3]);
  const h = Number(t![1]);
  const mi = Number(t![2]);
  const s = Number(t![3]);
  const whole = Math.floor(s);
  const ms = Date.UTC(year, month - 1, day, h, mi, whole);
  const back = new Date(ms);
  if (back.getUTCDate() !== day || back.getUTCMonth() !== month - 1 || h > 23 || mi > 59 || s >= 60) {
    fail(k, `time ${quote(text)} is not a valid date and time (dd/mm/yyyy,hh:mm:ss)`);
  }
  // Fraction kept from the text so that microseconds survive (s − whole would add rounding).
  const frac = t![3].includes('.') ? Number(`0.${t![3].split('.')[1]}`) : 0;
  return ms / 1000 + frac;
}

/** Checks a .cfg's first bytes and decodes it; refuses UTF-16 and oversized files. */
export function decodeCfg(buf: Buffer, label: string): string {
  if (buf.length === 0) throw new FileRefusedError(`${label} line 1`, 'the configuration file is empty');
  if (buf.length > MAX_CFG_BYTES) {
    throw new FileRefusedError(label, `the configuration file is larger than ${MAX_CFG_BYTES / 1024} KiB; is it really a .cfg?`);
  }
  checkTextHead(buf.subarray(0, 64), label);
  let text = buf.toString('utf8');
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  return text;
}
