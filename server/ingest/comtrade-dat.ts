// The COMTRADE data file (.dat), IEEE C37.111-1999/-2013 (standard), streamed row by row.
// Every row (ASCII line or binary record) holds: sample number, timestamp (µs × timemult from the
// first sample), the analog values as raw integers (value = a · raw + b), the digital words.
//  - ASCII: comma-separated; an empty analog field, or the raw value 99999 (the 1999 edition's
//    marker, also written by modal/formats), is a missing value (dropout).
//  - BINARY / BINARY32: little-endian uint32 sample number and timestamp, int16 / int32 analog
//    values, digital channels packed 16 to a uint16; raw 0x8000 / 0x80000000 marks a missing
//    value; timestamp 0xFFFFFFFF marks a missing timestamp.
//  - FLOAT32 (2013): analog values as IEEE 754 single precision; NaN marks a missing value.
// Digital channels are read past (Keel stores measurements, not status bits).
import type { Readable } from 'node:stream';
import type { AnalogChannel, ComtradeConfig } from './comtrade-cfg';
import { csvRecords } from './csv-stream';
import { FileRefusedError } from './errors';
import type { SourceRow } from './source';
import { numberProblem, parseCell, quote } from './text-values';

/** Raw ASCII value marking a missing sample. */
export const ASCII_MISSING = 99999;

export interface DatOptions {
  cfg: ComtradeConfig;
  /** File name for messages ("event.dat", or the .cff's name). */
  label: string;
  /** The .cfg's name (or the .cff's) for messages about what the configuration announced. */
  cfgLabel: string;
  /** ASCII: lines before the data (in a .cff). */
  lineOffset?: number;
  /** Binary: bytes before the data (in a .cff). */
  byteOffset?: number;
  /** Binary: length of the data in bytes, when known (the .cff DAT section header). */
  byteLength?: number;
}

/** Bytes per binary record: sample number, timestamp, analog values, digital words. */
export function binaryRecordSize(cfg: ComtradeConfig): number {
  const width = cfg.fileType === 'BINARY' ? 2 : 4;
  return 8 + cfg.analog.length * width + 2 * Math.ceil(cfg.digitalCount / 16);
}

export function binaryWhere(opts: DatOptions): (record: number) => string {
  const size = binaryRecordSize(opts.cfg);
  const base = opts.byteOffset ?? 0;
  return (record) => `${opts.label} record ${record} (byte ${base + (record - 1) * size})`;
}

export function asciiWhere(opts: DatOptions): (line: number) => string {
  return (line) => `${opts.label} line ${line}`;
}

/** value = a · raw + b (standard); a huge multiplier or raw value overflows, which no PMU quantity does. */
function scaled(ch: AnalogChannel, raw: number, loc: () => string): number {
  if (Number.isNaN(raw)) return NaN; // an empty ASCII cell: a dropout
  const v = ch.a * raw + ch.b;
  if (!Number.isFinite(v)) {
    throw new FileRefusedError(loc(), `analog channel ${ch.index} ${quote(ch.id)}: raw value ${raw} scaled by a = ${ch.a}, b = ${ch.b} is out of range`);
  }
  return v;
}

function timeOf(cfg: ComtradeConfig, sample: number, timestamp: number | null): number {
  if (timestamp !== null) return cfg.startTime + timestamp * cfg.timeMultiplier * 1e-6;
  return cfg.startTime + (sample - 1) / cfg.sampleRate;
}

function checkSampleNumber(
  cfg: ComtradeConfig,
  opts: DatOptions,
  loc: () => string,
  sample: number,
  prev: number | null,
): void {
  // Sample 1 is at the configuration's start time (timeOf), and endsamp counts from it: data
  // that begin later were cut at the front, and would be placed at the wrong times.
  if (prev === null && sample !== 1) {
    throw new FileRefusedError(loc(), `the first sample is numbered ${sample}, but the data of ${opts.cfgLabel} start at sample 1; is the data file cut at the front?`);
  }
  if (prev !== null && sample !== prev + 1) {
    throw new FileRefusedError(loc(), `sample number ${sample} does not follow ${prev} (expected ${prev + 1})`);
  }
  if (sample > cfg.lastSample) {
    throw new FileRefusedError(
      loc(),
      `sample number ${sample} is past the last sample ${cfg.lastSample} announced by ${opts.cfgLabel} (endsamp)`,
    );
  }
}

function checkEnd(cfg: ComtradeConfig, opts: DatOptions, loc: string, last: number | null): void {
  if (last === null) throw new FileRefusedError(loc, 'the data file holds no samples');
  if (last < cfg.lastSample) {
    throw new FileRefusedError(
      loc,
      `the data end at sample ${last}, but ${opts.cfgLabel} announces ${cfg.lastSample} samples (endsamp); is the data file truncated?`,
    );
  }
}

export async function* asciiDatRows(input: Readable, opts: DatOptions, select: number[]): AsyncGenerator<SourceRow> {
  const { cfg } = opts;
  const where = asciiWhere(opts);
  const nA = cfg.analog.length;
  const fieldCount = 2 + nA + cfg.digitalCount;
  const csv = csvRecords(input, { lineOffset: opts.lineOffset, where });
  let prev: number | null = null;
  let lastLine = (opts.lineOffset ?? 0) + 1;
  try {
    for (;;) {
      const r = await csv.records.next();
      if (r.done) break;
      const { line, fields } = r.value;
      lastLine = line;
      const loc = () => where(line);
      if (fields.length !== fieldCount) {
        throw new FileRefusedError(
          loc(),
          `${fields.length} fields, but ${opts.cfgLabel} describes ${fieldCount} (sample number, timestamp, ${nA} analog, ${cfg.digitalCount} digital)` +
            (fields.length < fieldCount ? ' (a truncated row?)' : ''),
        );
      }
      if (!/^\d+$/.test(fields[0])) throw new FileRefusedError(loc(), `sample number ${quote(fields[0])} is not a whole number`);
      const sample = Number(fields[0]);
      checkSampleNumber(cfg, opts, loc, sample, prev);
      prev = sample;
      let ts: number | null = null;
      if (fields[1] !== '') {
        const v = parseCell(fields[1]);
        if (v === undefined) throw new FileRefusedError(loc(), `timestamp: ${numberProblem(fields[1])}`);
        ts = v;
      } else if (cfg.sampleRate === 0) {
        throw new FileRefusedError(loc(), `the timestamp is empty, and ${opts.cfgLabel} gives no sample rate to time the row by`);
      }
      const values = new Float64Array(select.length);
      for (let k = 0; k < select.length; k++) {
        const ch = cfg.analog[select[k]];
        const cell = fields[2 + select[k]];
        const raw = parseCell(cell);
        if (raw === undefined) throw new FileRefusedError(loc(), `analog channel ${ch.index} ${quote(ch.id)}: ${numberProblem(cell)}`);
        values[k] = raw === ASCII_MISSING ? NaN : scaled(ch, raw, loc);
      }
      yield { line, time: timeOf(cfg, sample, ts), timeText: fields[1] === '' ? `sample ${sample}` : `${fields[1]} µs`, values };
    }
    checkEnd(cfg, opts, where(lastLine), prev);
  } finally {
    csv.destroy();
  }
}

export async function* binaryDatRows(
  input: AsyncIterable<Buffer>,
  opts: DatOptions,
  select: number[],
): AsyncGenerator<SourceRow> {
  const { cfg } = opts;
  const size = binaryRecordSize(cfg);
  const where = binaryWhere(opts);
  const width = cfg.fileType === 'BINARY' ? 2 : 4;
  const offsets = select.map((j) => 8 + j * width);
  const chans = select.map((j) => cfg.analog[j]);
  let carry: Buffer = Buffer.alloc(0);
  let record = 0;
  let prev: number | null = null;
  let consumed = 0;
  const limit = opts.byteLength ?? Infinity;

  const decode = (buf: Buffer, at: number): SourceRow => {
    record++;
    const n = record;
    const loc = () => where(n);
    const sample = buf.readUInt32LE(at);
    checkSampleNumber(cfg, opts, loc, sample, prev);
    prev = sample;
    const tsRaw = buf.readUInt32LE(at + 4);
    let ts: number | null = tsRaw;
    if (tsRaw === 0xffffffff) {
      if (cfg.sampleRate === 0) {
        throw new FileRefusedError(loc(), `the timestamp is marked missing, and ${opts.cfgLabel} gives no sample rate to time the record by`);
      }
      ts = null;
    }
    const values = new Float64Array(select.length);
    for (let k = 0; k < select.length; k++) {
      const o = at + offsets[k];
      let raw: number;
      if (cfg.fileType === 'BINARY') {
        raw = buf.readInt16LE(o);
        values[k] = raw === -0x8000 ? NaN : scaled(chans[k], raw, loc);
      } else if (cfg.fileType === 'BINARY32') {
        raw = buf.readInt32LE(o);
        values[k] = raw === -0x80000000 ? NaN : scaled(chans[k], raw, loc);
      } else {
        raw = buf.readFloatLE(o);
        if (raw === Infinity || raw === -Infinity) {
          throw new FileRefusedError(loc(), `analog channel ${chans[k].index} ${quote(chans[k].id)}: value is infinite`);
        }
        values[k] = Number.isNaN(raw) ? NaN : scaled(chans[k], raw, loc);
      }
    }
    return { line: n, time: timeOf(cfg, sample, ts), timeText: ts === null ? `sample ${sample}` : `${ts} µs`, values };
  };

  for await (const chunkIn of input) {
    let chunk = chunkIn;
    if (consumed + chunk.length > limit) chunk = chunk.subarray(0, limit - consumed);
    consumed += chunk.length;
    const buf = carry.length ? Buffer.concat([carry, chunk]) : chunk;
    const whole = Math.floor(buf.length / size) * size;
    for (let at = 0; at < whole; at += size) yield decode(buf, at);
    carry = Buffer.from(buf.subarray(whole));
    if (consumed >= limit) break;
  }
  if (carry.length > 0) {
    throw new FileRefusedError(
      where(record + 1),
      `the file ends ${carry.length} bytes into a ${size}-byte record (a truncated data file?)`,
    );
  }
  if (Number.isFinite(limit) && consumed < limit) {
    throw new FileRefusedError(
      where(record + 1),
      `the data section ends after ${consumed} bytes, but its header announces ${limit}`,
    );
  }
  checkEnd(cfg, opts, where(Math.max(1, record)), prev);
}
