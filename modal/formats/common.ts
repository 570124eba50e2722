// Helpers shared by the CSV and COMTRADE readers and writers: time stamps, number formatting and
// reporting-rate detection against the IEEE C37.118.1 list (standard).
import { ModalInputError } from '../errors';
import { STANDARD_REPORTING_RATES } from '../preprocess';
import type { ChannelData, SampledRecord } from '../types';

export type NominalHz = 50 | 60;

/** A time or value as messages print it: up to 6 decimals, no trailing zeros. */
export function fmtNum(t: number): string {
  if (!Number.isFinite(t)) return String(t);
  return String(Number(t.toFixed(6)));
}

/** Epoch seconds → ISO-8601 UTC with milliseconds, e.g. 2025-01-01T00:00:00.033Z. */
export function isoMs(t: number): string {
  return new Date(Math.round(t * 1000)).toISOString();
}

const ISO_RE = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2}):(\d{2})(?:\.(\d{1,9}))?(Z|[+-]\d{2}:?\d{2})?$/;

/**
 * Parses an ISO-8601 UTC time stamp (YYYY-MM-DDThh:mm:ss[.fraction]Z, or +00:00) to epoch seconds,
 * keeping every fractional digit (Date.parse stops at milliseconds). Returns a string naming the
 * problem when the text is not one.
 */
export function parseIsoUtc(text: string): number | string {
  const m = ISO_RE.exec(text);
  if (!m) return 'is not an ISO-8601 time (YYYY-MM-DDThh:mm:ss.sssZ) or epoch seconds';
  const [, y, mo, d, h, mi, s, frac, zone] = m;
  if (zone === undefined) return 'has no time zone; write UTC times with a trailing Z';
  if (zone !== 'Z' && !/^[+-]00:?00$/.test(zone)) return `is not UTC (offset ${zone}); write UTC times with a trailing Z`;
  const Y = Number(y);
  const M = Number(mo);
  const D = Number(d);
  const hh = Number(h);
  const mm = Number(mi);
  const ss = Number(s);
  const ms = Date.UTC(Y, M - 1, D, hh, mm, ss);
  const back = new Date(ms);
  if (
    back.getUTCFullYear() !== Y ||
    back.getUTCMonth() !== M - 1 ||
    back.getUTCDate() !== D ||
    hh > 23 ||
    mm > 59 ||
    ss > 59
  ) {
    return 'is not a valid calendar date and time';
  }
  return ms / 1000 + (frac ? Number(`0.${frac}`) : 0);
}

/** Exact decimal number (no hex, no Infinity, no blanks): what a numeric CSV/COMTRADE field may hold. */
export const NUMBER_RE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * The standard reporting rate whose frame interval the median row spacing matches within 5 %
 * (standard rates are at least 20 % apart, so the match is unambiguous; ISO times rounded to the
 * millisecond are 2 % off at 60 frames/s). Returns null when none does.
 */
export function matchStandardRate(medianInterval: number, nominalHz: NominalHz): number | null {
  if (!(medianInterval > 0)) return null;
  const measured = 1 / medianInterval;
  for (const r of STANDARD_REPORTING_RATES[nominalHz]) {
    if (Math.abs(measured / r - 1) <= 0.05) return r;
  }
  return null;
}

export function standardRatesText(nominalHz: NominalHz): string {
  return `IEEE C37.118.1: ${STANDARD_REPORTING_RATES[nominalHz].join(', ')} frames/s`;
}

export function isStandardRate(rate: number, nominalHz: NominalHz): boolean {
  return STANDARD_REPORTING_RATES[nominalHz].includes(rate);
}

export function median(values: Float64Array): number {
  const s = values.slice().sort();
  const n = s.length;
  if (n === 0) return NaN;
  return n % 2 ? s[(n - 1) / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
}

/** Checks the record a writer is given; returns the common length. */
export function checkRecordForWriting(record: SampledRecord, what: string): number {
  if (!record || !Array.isArray(record.channels) || record.channels.length === 0) {
    throw new ModalInputError(`${what}: the record has no channels`);
  }
  if (!(Number.isFinite(record.rate) && record.rate > 0)) throw new ModalInputError(`${what}: the record's rate must be a positive number, got ${record.rate}`);
  if (!Number.isFinite(record.startTime)) throw new ModalInputError(`${what}: the record's startTime must be finite epoch seconds, got ${record.startTime}`);
  const n = record.channels[0].values.length;
  const seen = new Set<string>();
  record.channels.forEach((c: ChannelData) => {
    if (c.values.length !== n) throw new ModalInputError(`${what}: channel ${c.name} has ${c.values.length} samples, the first channel ${n}`);
    if (!c.name || /[,"\r\n]/.test(c.name)) throw new ModalInputError(`${what}: channel name ${JSON.stringify(c.name)} is empty or holds a comma, quote or line break`);
    if (seen.has(c.name)) throw new ModalInputError(`${what}: channel ${c.name} appears twice`);
    seen.add(c.name);
  });
  return n;
}
