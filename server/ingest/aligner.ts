// The row checks of §5.5, in file order, so that a refusal names the FIRST offending row:
//  - times strictly increase; a row repeated verbatim (same time, same values — a resent PMU
//    frame) is dropped and counted as a duplicate; the same time with other values is refused;
//  - the reporting rate is a standard one (IEEE C37.118.1, standard: 10, 12, 15, 20, 30, 60
//    frames/s on 60 Hz systems; 10, 25, 50 on 50 Hz systems). A COMTRADE .cfg declares it; for
//    CSV it is measured from the first rows (the median spacing, refined as the span of those rows
//    over the whole number of frames it holds, so that times rounded to the millisecond, jitter
//    and gaps still give the exact rate);
//  - every row sits on the grid start + k / rate (within a quarter of a frame); skipped frames
//    are gaps, counted and stored as NaN; a gap longer than `maxGapSeconds` is refused (it is more
//    likely two recordings pasted together, and would be stored as a long run of nothing).
import { STANDARD_REPORTING_RATES } from '../../modal/preprocess';
import { FileRefusedError } from './errors';
import type { DeclaredRate, SourceRow } from './source';

export interface FrameSink {
  begin(startTime: number, rate: number): void;
  frame(slot: number, values: Float64Array): void;
}

export interface AlignOptions {
  declaredRate?: DeclaredRate;
  /** 50 or 60: only that system's rates are standard; anything else: either list. */
  nominalHz?: number;
  /** Longest gap filled with missing samples, seconds (default 600). */
  maxGapSeconds?: number;
  where: (line: number) => string;
}

/** Rows used to measure the reporting rate of a file that does not declare it. */
export const RATE_DETECTION_ROWS = 121;
/** A row more than this fraction of a frame away from the grid is refused. */
export const GRID_TOLERANCE = 0.25;
/** Relative tolerance between a measured frame spacing and a standard rate's. */
export const RATE_TOLERANCE = 0.01;
export const DEFAULT_MAX_GAP_SECONDS = 600;

export function standardRates(nominalHz?: number): readonly number[] {
  if (nominalHz === 50 || nominalHz === 60) return STANDARD_REPORTING_RATES[nominalHz];
  return [...new Set([...STANDARD_REPORTING_RATES[60], ...STANDARD_REPORTING_RATES[50]])].sort((a, b) => a - b);
}

export function standardRatesText(nominalHz?: number): string {
  const list = (xs: readonly number[]) => xs.join(', ').replace(/, (\d+)$/, ' or $1');
  if (nominalHz === 50 || nominalHz === 60) {
    return `IEEE C37.118.1: ${list(STANDARD_REPORTING_RATES[nominalHz])} frames/s on ${nominalHz} Hz systems`;
  }
  return `IEEE C37.118.1: ${list(STANDARD_REPORTING_RATES[60])} frames/s on 60 Hz systems; ${list(STANDARD_REPORTING_RATES[50])} on 50 Hz systems`;
}

/** Seconds for messages: up to microseconds, no exponent, no trailing zeros. */
export function fmtSeconds(s: number): string {
  return String(Number(s.toFixed(6)));
}

function fmtDuration(s: number): string {
  if (s < 120) return `${fmtSeconds(Number(s.toFixed(3)))} s`;
  if (s < 7200) return `${(s / 60).toFixed(1)} min`;
  return `${(s / 3600).toFixed(1)} h`;
}

function sameValues(a: Float64Array, b: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    const y = b[i];
    if (x !== y && !(x !== x && y !== y)) return false;
  }
  return true;
}

export class FrameAligner {
  rate: number | undefined;
  startTime: number | undefined;
  rows = 0;
  duplicates = 0;
  gaps = 0;
  missingFrames = 0;
  endTime = NaN;
  private prev: SourceRow | null = null;
  private placed: SourceRow | null = null;
  private firstLine = 0;
  private lastSlot = -1;
  private buffer: SourceRow[] = [];
  private readonly maxGap: number;

  constructor(
    private readonly opts: AlignOptions,
    private readonly sink: FrameSink,
  ) {
    this.maxGap = opts.maxGapSeconds ?? DEFAULT_MAX_GAP_SECONDS;
    const d = opts.declaredRate;
    if (d) {
      const r = standardRates(opts.nominalHz).find((x) => Math.abs(d.rate - x) <= 1e-9 * x);
      if (r === undefined) {
        throw new FileRefusedError(
          d.where,
          `sample rate ${d.rate} samples/s is not a standard reporting rate (${standardRatesText(opts.nominalHz)})`,
        );
      }
      this.rate = r;
    }
  }

  private refuse(row: SourceRow, reason: string): never {
    throw new FileRefusedError(this.opts.where(row.line), reason);
  }

  push(row: SourceRow): void {
    const prev = this.prev;
    if (prev) {
      if (row.time < prev.time) {
        this.refuse(
          row,
          `time ${row.timeText} is not after the previous row's time ${prev.timeText} (it goes back by ${fmtSeconds(prev.time - row.time)} s)`,
        );
      }
      if (row.time === prev.time) {
        if (sameValues(row.values, prev.values)) {
          this.duplicates++;
          return;
        }
        this.refuse(row, `time ${row.timeText} is not after the previous row's time ${prev.timeText} (duplicate timestamp)`);
      }
    }
    this.prev = row;
    if (this.startTime === undefined) {
      if (this.rate === undefined) {
        this.buffer.push(row);
        if (this.buffer.length >= RATE_DETECTION_ROWS) this.detectRate();
        return;
      }
      this.start(row);
    }
    this.place(row);
  }

  finish(): void {
    if (this.startTime === undefined) {
      if (this.buffer.length === 0) throw new FileRefusedError('', 'the file holds no data rows');
      if (this.buffer.length < 2) {
        this.refuse(this.buffer[0], 'the file holds only one data row; at least two are needed to find the reporting rate');
      }
      this.detectRate();
    }
  }

  private start(row: SourceRow): void {
    this.startTime = row.time;
    this.firstLine = row.line;
    this.sink.begin(row.time, this.rate!);
  }

  private detectRate(): void {
    const rows = this.buffer;
    const d = new Float64Array(rows.length - 1);
    for (let i = 1; i < rows.length; i++) d[i - 1] = rows[i].time - rows[i - 1].time;
    const sorted = d.slice().sort();
    const h = sorted.length >> 1;
    const median = sorted.length % 2 ? sorted[h] : (sorted[h - 1] + sorted[h]) / 2;
    // Each spacing counts as a whole number of frames (1, or more across a gap); the span of
    // the rows over that many frames is the spacing, so that the rounding of single times
    // (16/17 ms at 60 frames/s) and jitter average out over the span.
    let frames = 0;
    for (const x of d) frames += Math.round(x / median);
    const span = rows[rows.length - 1].time - rows[0].time;
    const spacing = span / Math.max(1, frames);
    const measured = 1 / spacing;
    const rate = standardRates(this.opts.nominalHz).find((r) => Math.abs(measured / r - 1) <= RATE_TOLERANCE);
    if (rate === undefined) {
      let first = 0;
      while (first < d.length && Math.abs(d[first] / median - 1) > RATE_TOLERANCE) first++;
      this.refuse(
        rows[Math.min(first, d.length - 1) + 1],
        `rows are ${fmtSeconds(spacing)} s apart (${Number(measured.toPrecision(4))} frames/s), which is not a standard reporting rate (${standardRatesText(this.opts.nominalHz)})`,
      );
    }
    this.rate = rate;
    this.buffer = [];
    this.start(rows[0]);
    for (const r of rows) this.place(r);
  }

  private place(row: SourceRow): void {
    const rate = this.rate!;
    const pos = (row.time - this.startTime!) * rate;
    const slot = Math.round(pos);
    const off = Math.abs(pos - slot);
    if (off > GRID_TOLERANCE) {
      this.refuse(
        row,
        `time ${row.timeText} is ${off.toFixed(2)} of a frame off the ${rate} frames/s grid that starts at ${this.opts.where(this.firstLine)} (rows must be whole multiples of 1/${rate} s apart)`,
      );
    }
    const placed = this.placed;
    if (placed && slot <= this.lastSlot) {
      this.refuse(
        row,
        `time ${row.timeText} falls in the same 1/${rate} s frame as the previous row's time ${placed.timeText}`,
      );
    }
    const missing = slot - this.lastSlot - 1;
    if (placed && missing > 0) {
      if (missing / rate > this.maxGap) {
        this.refuse(
          row,
          `time ${row.timeText} comes ${fmtDuration(row.time - placed.time)} after the previous row's time ${placed.timeText}; ` +
            `gaps up to ${fmtDuration(this.maxGap)} are kept as missing samples — split the file at this gap`,
        );
      }
      this.gaps++;
      this.missingFrames += missing;
    }
    this.sink.frame(slot, row.values);
    this.lastSlot = slot;
    this.placed = row;
    this.rows++;
    this.endTime = this.startTime! + slot / rate;
  }
}
