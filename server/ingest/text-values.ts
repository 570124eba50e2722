// Reading numbers and times out of text cells, strictly: a cell is a plain decimal number (with
// an optional exponent) or empty. Number() alone would also take "0x1F", "Infinity" and
// whitespace-only cells, none of which a PMU export should hold.

const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Why a cell is not a number, for refusal messages; null when it is one. */
export function numberProblem(text: string): string | null {
  if (DECIMAL.test(text)) {
    return Number.isFinite(Number(text)) ? null : `value ${quote(text)} is out of range`;
  }
  if (text.includes('\uFFFD')) {
    return `value ${quote(text)} holds bytes that are not UTF-8 (a Latin-1 or Windows-1252 file?); save the file as UTF-8`;
  }
  if (/^[+-]?(nan|inf|infinity)$/i.test(text)) {
    return `value ${quote(text)} is not a finite number (leave the cell empty to mark a dropout)`;
  }
  if (/^[+-]?\d+,\d+$/.test(text)) {
    return `value ${quote(text)} has a decimal comma; write numbers with a decimal point`;
  }
  return `value ${quote(text)} is not a number`;
}

/** Parses a strict decimal; NaN for an empty cell (a dropout); undefined when it is not a number. */
export function parseCell(text: string): number | undefined {
  if (text === '') return NaN;
  if (!DECIMAL.test(text)) return undefined;
  const v = Number(text);
  return Number.isFinite(v) ? v : undefined;
}

/** Quotes a cell for a message, shortened so that a binary blob cannot flood the message. */
export function quote(text: string): string {
  const clean = text.replace(/[\u0000-\u001f\u007f\uFEFF]/g, (c) =>
    c === '\uFEFF' ? '\\uFEFF' : `\\x${c.charCodeAt(0).toString(16).padStart(2, '0')}`,
  );
  return `'${clean.length > 40 ? `${clean.slice(0, 37)}...` : clean}'`;
}

export type TimeFormat = 'epoch' | 'iso';

/** Latest accepted time, epoch seconds (2100-01-01): later values are most likely milliseconds. */
export const MAX_EPOCH_SECONDS = 4_102_444_800;

const ISO =
  /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2}):(\d{2})(\.\d+)?(Z|[+-]\d{2}:?\d{2})?$/;

export interface ParsedTime {
  /** Epoch seconds, UTC. */
  t: number;
  format: TimeFormat;
}

/**
 * Reads a time cell: epoch seconds (a plain decimal number) or ISO-8601 with an explicit UTC
 * designator or offset ("2025-01-01T00:00:00.0333Z", "2025-01-01 01:00:00+01:00"). Fractions
 * of a second keep their full precision (Date.parse would cut them to milliseconds, which at
 * 60 frames/s is 6 % of a frame). Returns a reason string when the cell is no valid time.
 */
export function parseTimeCell(text: string): ParsedTime | string {
  if (text === '') return 'the time cell is empty';
  if (DECIMAL.test(text)) {
    const t = Number(text);
    if (!Number.isFinite(t)) return `time ${quote(text)} is out of range`;
    if (t < 0) return `time ${quote(text)} is before 1970 (epoch seconds must not be negative)`;
    if (t >= MAX_EPOCH_SECONDS) {
      return `time ${quote(text)} is after 2100 as epoch seconds (milliseconds? give seconds)`;
    }
    return { t, format: 'epoch' };
  }
  const m = ISO.exec(text);
  if (!m) {
    if (text.includes('\uFFFD')) {
      return `time ${quote(text)} holds bytes that are not UTF-8 (a Latin-1 or Windows-1252 file?); save the file as UTF-8`;
    }
    return `time ${quote(text)} is neither epoch seconds nor an ISO-8601 UTC time (e.g. 2025-01-01T00:00:00.000Z)`;
  }
  const [, ys, mos, ds, hs, mis, ss, frac, zone] = m;
  if (!zone) {
    return `time ${quote(text)} has no time zone; add Z for UTC (or an offset such as +01:00)`;
  }
  const y = Number(ys);
  const mo = Number(mos);
  const d = Number(ds);
  const h = Number(hs);
  const mi = Number(mis);
  const s = Number(ss);
  const ms = Date.UTC(y, mo - 1, d, h, mi, s);
  const back = new Date(ms);
  if (
    back.getUTCFullYear() !== y ||
    back.getUTCMonth() !== mo - 1 ||
    back.getUTCDate() !== d ||
    h > 23 ||
    mi > 59 ||
    s > 59
  ) {
    return `time ${quote(text)} is not a valid calendar date and time`;
  }
  let offsetMin = 0;
  if (zone !== 'Z') {
    const sign = zone[0] === '-' ? -1 : 1;
    const digits = zone.slice(1).replace(':', '');
    offsetMin = sign * (Number(digits.slice(0, 2)) * 60 + Number(digits.slice(2)));
  }
  const t = ms / 1000 - offsetMin * 60 + (frac ? Number(frac) : 0);
  if (t < 0 || t >= MAX_EPOCH_SECONDS) return `time ${quote(text)} is outside 1970–2099`;
  return { t, format: 'iso' };
}
