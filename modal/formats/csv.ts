// PMU records as CSV (DESIGN.md §5.5): a `time` column — epoch seconds or ISO-8601 UTC — then one
// numeric column per channel. Pure: works on strings, no I/O. Splitting is csv-parse's job
// (quotes, BOM, line endings); this module checks every row.
//
// Rules the reader enforces (each refusal names the 1-based line and the reason):
//  - header: first column `time`, then unique, non-empty channel names;
//  - every row has the header's number of fields; one time format throughout;
//  - times strictly increase (duplicates and reversals are refused);
//  - the row spacing is a standard reporting rate (standard: IEEE C37.118.1 — 10, 12, 15, 20, 30,
//    60 frames/s for 60 Hz systems; 10, 25, 50 for 50 Hz) and every row sits on that frame grid;
//  - values are decimal numbers; an empty field or NaN is a dropout (kept as NaN and counted);
//  - missing frames (gaps) become NaN samples and are counted; a gap over `maxGapSeconds` is refused.
import { parse } from 'csv-parse/sync';
import { ModalInputError } from '../errors';
import type { SampledRecord } from '../types';
import {
  NUMBER_RE,
  checkRecordForWriting,
  fmtNum,
  isoMs,
  matchStandardRate,
  median,
  parseIsoUtc,
  standardRatesText,
  type NominalHz,
} from './common';
import { FormatError } from './errors';

export interface CsvWriteOptions {
  /** Time column as epoch seconds (default) or ISO-8601 UTC with milliseconds. */
  time?: 'epoch' | 'iso';
  /** Decimals of the values (default 6). */
  decimals?: number;
}

/** Writes a record as CSV text (LF line ends, header `time,<channels…>`, NaN as an empty field). */
export function writeCsv(record: SampledRecord, options: CsvWriteOptions = {}): string {
  const n = checkRecordForWriting(record, 'writeCsv');
  const decimals = options.decimals ?? 6;
  if (!(Number.isInteger(decimals) && decimals >= 0 && decimals <= 15)) throw new ModalInputError(`writeCsv: decimals must be an integer from 0 to 15, got ${decimals}`);
  const iso = (options.time ?? 'epoch') === 'iso';
  const lines: string[] = [['time', ...record.channels.map((c) => c.name)].join(',')];
  const cols = record.channels.map((c) => c.values);
  for (let i = 0; i < n; i++) {
    const t = record.startTime + i / record.rate;
    const fields: string[] = [iso ? isoMs(t) : fmtNum(t)];
    for (const v of cols) fields.push(Number.isFinite(v[i]) ? v[i].toFixed(decimals) : '');
    lines.push(fields.join(','));
  }
  return lines.join('\n') + '\n';
}

export interface CsvReadOptions {
  /** Nominal system frequency that decides the standard rate list (default 60, the Tarrow grid). */
  nominalHz?: NominalHz;
  /** Longest gap between consecutive rows, seconds (default 3600). */
  maxGapSeconds?: number;
}

export interface CsvReport {
  /** Data rows read. */
  rows: number;
  /** Samples per channel in the record (rows plus missing frames). */
  frames: number;
  rate: number;
  timeFormat: 'epoch' | 'iso';
  /** Gaps between rows (runs of missing frames) and the frames missing in them. */
  gaps: number;
  missingFrames: number;
  /** Empty or NaN fields per channel. */
  dropouts: Record<string, number>;
}

export interface ParsedCsv {
  record: SampledRecord;
  report: CsvReport;
}

/** Parses CSV text into a record; throws FormatError naming the line and the reason. */
export function parseCsvRecord(text: string, options: CsvReadOptions = {}): SampledRecord {
  return parseCsv(text, options).record;
}

/** parseCsvRecord with a report of what was found (gaps, dropouts, rate). */
export function parseCsv(text: string, options: CsvReadOptions = {}): ParsedCsv {
  const nominalHz = options.nominalHz ?? 60;
  const maxGap = options.maxGapSeconds ?? 3600;
  if (typeof text !== 'string') throw new FormatError('The CSV input must be text', 'csv');
  let rows: { info: { lines: number }; record: string[] }[];
  try {
    rows = parse(text, { info: true, relax_column_count: true, skip_empty_lines: true, trim: true, bom: true }) as unknown as typeof rows;
  } catch (e) {
    const err = e as Error & { lines?: number };
    const line = typeof err.lines === 'number' ? err.lines : null;
    throw new FormatError(`${line !== null ? `line ${line}: ` : ''}the file is not valid CSV (${err.message})`, 'csv', line);
  }
  if (rows.length === 0) throw new FormatError('The file is empty: expected a header row `time,<channel>,…` and data rows', 'csv');

  // --- header
  const head = rows[0];
  const hl = head.info.lines;
  const header = head.record;
  if (header[0]?.toLowerCase() !== 'time') {
    throw new FormatError(`line ${hl}: the first column must be "time", found "${header[0] ?? ''}"`, 'csv', hl);
  }
  if (header.length < 2) throw new FormatError(`line ${hl}: the header names no channel after "time"`, 'csv', hl);
  const names = header.slice(1);
  const firstCol = new Map<string, number>();
  names.forEach((name, k) => {
    if (name === '') throw new FormatError(`line ${hl}: column ${k + 2} has no channel name`, 'csv', hl);
    const prev = firstCol.get(name);
    if (prev !== undefined) throw new FormatError(`line ${hl}: channel "${name}" appears twice (columns ${prev} and ${k + 2})`, 'csv', hl);
    firstCol.set(name, k + 2);
  });
  const data = rows.slice(1);
  if (data.length === 0) throw new FormatError(`The file has a header but no data rows`, 'csv');

  // --- pass 1: times, field counts
  const nf = header.length;
  const times = new Float64Array(data.length);
  let format: 'epoch' | 'iso' | null = null;
  for (let r = 0; r < data.length; r++) {
    const { info, record } = data[r];
    const line = info.lines;
    if (record.length !== nf) {
      throw new FormatError(`line ${line}: expected ${nf} fields (time and ${nf - 1} channels), found ${record.length}`, 'csv', line);
    }
    const tText = record[0];
    let t: number;
    if (NUMBER_RE.test(tText)) {
      if (format === 'iso') throw new FormatError(`line ${line}: time "${tText}" is epoch seconds but earlier rows use ISO-8601 times`, 'csv', line);
      format = 'epoch';
      t = Number(tText);
    } else {
      const parsed = parseIsoUtc(tText);
      if (typeof parsed === 'string') throw new FormatError(`line ${line}: time "${tText}" ${parsed}`, 'csv', line);
      if (format === 'epoch') throw new FormatError(`line ${line}: time "${tText}" is an ISO-8601 time but earlier rows use epoch seconds`, 'csv', line);
      format = 'iso';
      t = parsed;
    }
    if (r > 0) {
      const prev = times[r - 1];
      const shown = (x: number) => (format === 'iso' ? isoMs(x) : fmtNum(x));
      if (t === prev) {
        throw new FormatError(`line ${line}: time ${shown(t)} is not after the previous row's ${shown(prev)} (duplicate timestamp)`, 'csv', line);
      }
      if (t < prev) {
        throw new FormatError(`line ${line}: time ${shown(t)} is before the previous row's ${shown(prev)} (timestamps must increase)`, 'csv', line);
      }
      if (t - prev > maxGap) {
        throw new FormatError(`line ${line}: time ${shown(t)} is ${fmtNum(t - prev)} s after the previous row; gaps longer than ${maxGap} s are refused`, 'csv', line);
      }
    }
    times[r] = t;
  }

  // --- reporting rate and frame grid
  if (data.length < 2) throw new FormatError(`The file has one data row; at least two are needed to find the reporting rate`, 'csv');
  const diffs = new Float64Array(data.length - 1);
  for (let r = 1; r < data.length; r++) diffs[r - 1] = times[r] - times[r - 1];
  const med = median(diffs);
  const rate = matchStandardRate(med, nominalHz);
  if (rate === null) {
    throw new FormatError(
      `the rows are ${fmtNum(med)} s apart (${Number((1 / med).toFixed(3))} frames/s), not a standard reporting rate for a ${nominalHz} Hz system (${standardRatesText(nominalHz)})`,
      'csv',
    );
  }
  const t0 = times[0];
  const tol = 0.25 / rate;
  const frameOf = new Int32Array(data.length);
  for (let r = 0; r < data.length; r++) {
    const k = Math.round((times[r] - t0) * rate);
    const off = times[r] - (t0 + k / rate);
    if (Math.abs(off) > tol) {
      const line = data[r].info.lines;
      throw new FormatError(
        `line ${line}: time ${format === 'iso' ? isoMs(times[r]) : fmtNum(times[r])} is off the ${rate} frames/s grid by ${Number((Math.abs(off) * 1000).toFixed(1))} ms`,
        'csv',
        line,
      );
    }
    if (r > 0 && k === frameOf[r - 1]) {
      const line = data[r].info.lines;
      throw new FormatError(`line ${line}: two rows fall on the same ${rate} frames/s frame (timestamps closer than one frame)`, 'csv', line);
    }
    frameOf[r] = k;
  }
  const frames = frameOf[data.length - 1] + 1;

  // --- pass 2: values
  const values = names.map(() => new Float64Array(frames).fill(NaN));
  const dropouts: Record<string, number> = Object.fromEntries(names.map((n) => [n, 0]));
  for (let r = 0; r < data.length; r++) {
    const { info, record } = data[r];
    const k = frameOf[r];
    for (let c = 0; c < names.length; c++) {
      const f = record[c + 1];
      if (f === '' || f.toLowerCase() === 'nan') {
        dropouts[names[c]]++;
        continue;
      }
      if (!NUMBER_RE.test(f)) {
        throw new FormatError(`line ${info.lines}: value "${f}" in column ${names[c]} is not a number`, 'csv', info.lines);
      }
      values[c][k] = Number(f);
    }
  }
  let gaps = 0;
  for (let r = 1; r < data.length; r++) if (frameOf[r] - frameOf[r - 1] > 1) gaps++;
  return {
    record: { startTime: t0, rate, channels: names.map((name, c) => ({ name, values: values[c] })) },
    report: { rows: data.length, frames, rate, timeFormat: format!, gaps, missingFrames: frames - data.length, dropouts },
  };
}
