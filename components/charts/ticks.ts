// Axis ticks and their labels. Time is shown in UTC (the time base of every stored timestamp,
// components/format.ts), so a chart reads the same for everyone; values as plain numbers with the
// unit written once in the axis title.

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

/** Candidate tick steps, ms: 1 s … 30 days. */
const TIME_STEPS = [
  1000, 2000, 5000, 10_000, 15_000, 30_000,
  MINUTE, 2 * MINUTE, 5 * MINUTE, 10 * MINUTE, 15 * MINUTE, 30 * MINUTE,
  HOUR, 2 * HOUR, 3 * HOUR, 6 * HOUR, 12 * HOUR,
  DAY, 2 * DAY, 7 * DAY, 14 * DAY, 30 * DAY,
];

const pad = (n: number) => (n < 10 ? `0${n}` : String(n));

/**
 * UTC ticks over [from, to] (epoch ms) at a round step giving at most `maxTicks` ticks. Steps
 * under a day align to UTC midnight, so 6-hour ticks fall on 00, 06, 12, 18.
 */
export function timeTicks(from: number, to: number, maxTicks: number): { ticks: number[]; step: number } {
  const span = Math.max(1, to - from);
  const step = TIME_STEPS.find((s) => span / s <= Math.max(1, maxTicks)) ?? TIME_STEPS[TIME_STEPS.length - 1];
  const ticks: number[] = [];
  // Align to the step counted from UTC midnight (weeks and months from the epoch: good enough).
  const dayStart = Math.floor(from / DAY) * DAY;
  const base = step < DAY ? dayStart : 0;
  let t = base + Math.ceil((from - base) / step) * step;
  for (; t <= to && ticks.length < 200; t += step) ticks.push(t);
  return { ticks, step };
}

/** A tick's label: time of day for short steps (with the date where a day begins), else the date. */
export function timeTickLabel(t: number, step: number): { main: string; sub: string | null } {
  const d = new Date(t);
  const date = `${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`;
  if (step >= DAY) return { main: date, sub: null };
  const secs = step < MINUTE ? `:${pad(d.getUTCSeconds())}` : '';
  const hm = `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}${secs}`;
  const midnight = d.getUTCHours() === 0 && d.getUTCMinutes() === 0 && d.getUTCSeconds() === 0;
  return { main: hm, sub: midnight ? date : null };
}

/** "UTC, 2031-05-04" or "UTC, 2031-05-04 – 05-06": the axis title that dates a short-step axis. */
export function timeAxisTitle(from: number, to: number): string {
  const a = new Date(from);
  const b = new Date(to);
  const da = `${a.getUTCFullYear()}-${pad(a.getUTCMonth() + 1)}-${pad(a.getUTCDate())}`;
  const db = `${pad(b.getUTCMonth() + 1)}-${pad(b.getUTCDate())}`;
  const same = a.getUTCFullYear() === b.getUTCFullYear() && a.getUTCMonth() === b.getUTCMonth() && a.getUTCDate() === b.getUTCDate();
  return same ? `UTC, ${da}` : `UTC, ${da} – ${db}`;
}

/**
 * Round value ticks at a 1-2-5 step (the usual "nice numbers" rule, as d3-array's ticks) giving
 * about `count` ticks over [min, max], and the decimals that show them without noise. Written out
 * here rather than importing d3-scale, which would bring its time-format and interpolation code
 * into the web bundle for this one function.
 */
export function valueTicks(min: number, max: number, count: number): { ticks: number[]; decimals: number } {
  const lo = Math.min(min, max);
  const hi = Math.max(min, max);
  const n = Math.max(2, count);
  const raw = (hi - lo) / n;
  if (!(raw > 0) || !Number.isFinite(raw)) return { ticks: Number.isFinite(lo) ? [lo] : [], decimals: 0 };
  const power = Math.floor(Math.log10(raw));
  const base = 10 ** power;
  const f = raw / base;
  const step = (f >= 7.07 ? 10 : f >= 3.16 ? 5 : f >= 1.41 ? 2 : 1) * base;
  const ticks: number[] = [];
  // Integer multiples of the step, so 0.1 + 0.2 rounding never shows up in a label.
  for (let k = Math.ceil(lo / step - 1e-9); k * step <= hi + step * 1e-9; k++) ticks.push(Number((k * step).toPrecision(12)));
  const decimals = Math.max(0, Math.min(6, -Math.floor(Math.log10(step) + 1e-9)));
  return { ticks, decimals };
}

const MINUS = '−';

/** A number with a typographic minus and fixed decimals (no "-0"). */
export function tickNumber(v: number, decimals: number): string {
  const s = v.toFixed(decimals);
  if (Number(s) === 0) return (0).toFixed(decimals);
  return s.startsWith('-') ? MINUS + s.slice(1) : s;
}

/** A [lo, hi] domain padded by `pad` of its span (and widened when it is a single value). */
export function paddedExtent(values: number[], pad = 0.06, include: number[] = []): [number, number] {
  // A loop, not Math.min(...values): long series would overflow the argument list.
  let lo = Infinity;
  let hi = -Infinity;
  for (const list of [values, include]) {
    for (const v of list) {
      if (!Number.isFinite(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  if (lo > hi) return [0, 1];
  if (hi - lo < 1e-12) {
    const w = Math.abs(hi) * 0.1 || 1;
    lo -= w;
    hi += w;
  }
  const p = (hi - lo) * pad;
  return [lo - p, hi + p];
}
