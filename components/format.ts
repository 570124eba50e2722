// Numbers always travel with their units (DESIGN.md §4): frequency in Hz to 3 decimals, damping
// ratio in % to 1 decimal with its confidence interval where one exists. Times are shown in UTC,
// the time base of every stored timestamp, and say so.

const MINUS = '−';

function fixed(n: number, digits: number): string {
  if (!Number.isFinite(n)) return '—';
  const s = n.toFixed(digits);
  // "-0.0" reads as a sign error; a typographic minus reads better than a hyphen.
  if (Number(s) === 0) return (0).toFixed(digits);
  return s.startsWith('-') ? MINUS + s.slice(1) : s;
}

export function formatHz(hz: number): string {
  return `${fixed(hz, 3)} Hz`;
}

export function formatHzRange(minHz: number, maxHz: number): string {
  return `${fixed(minHz, 3)}–${fixed(maxHz, 3)} Hz`;
}

export function formatPercent(p: number): string {
  return `${fixed(p, 1)} %`;
}

/** Damping ratio with the half-width of its interval, e.g. "2.8 % ±0.9". */
export function formatDamping(percent: number, lo?: number | null, hi?: number | null): string {
  const base = formatPercent(percent);
  if (lo == null || hi == null || !Number.isFinite(lo) || !Number.isFinite(hi)) return base;
  return `${base} ±${fixed(Math.abs(hi - lo) / 2, 1)}`;
}

export function formatKv(kV: number): string {
  return `${Number.isInteger(kV) ? String(kV) : fixed(kV, 1)} kV`;
}

export function formatRate(framesPerSecond: number): string {
  return `${framesPerSecond} frames/s`;
}

function pad(n: number): string {
  return n < 10 ? `0${n}` : String(n);
}

/** "2031-05-04 14:05 UTC" — unambiguous, sortable, and the same for every viewer. */
export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  return `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())} ${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())} UTC`;
}
