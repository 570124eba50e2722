// Number formats of the recording, scan and fit screens beyond components/format.ts, each with its
// unit (DESIGN.md §4). Times are UTC, as everywhere in Keel.

const MINUS = '−';

export function fixed(n: number, digits: number): string {
  if (!Number.isFinite(n)) return '—';
  const s = n.toFixed(digits);
  if (Number(s) === 0) return (0).toFixed(digits);
  return s.startsWith('-') ? MINUS + s.slice(1) : s;
}

/** "1.8 MiB", "312 KiB", "940 B". */
export function formatBytes(bytes: number | null | undefined): string {
  if (bytes == null || !Number.isFinite(bytes)) return '—';
  if (bytes >= 1 << 30) return `${fixed(bytes / (1 << 30), 2)} GiB`;
  if (bytes >= 1 << 20) return `${fixed(bytes / (1 << 20), 1)} MiB`;
  if (bytes >= 1 << 10) return `${Math.round(bytes / (1 << 10))} KiB`;
  return `${bytes} B`;
}

/** A length of time: "45.0 s", "25 min 0 s", "3 h 12 min". */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds == null || !Number.isFinite(seconds)) return '—';
  if (seconds < 120) return `${fixed(seconds, 1)} s`;
  const s = Math.round(seconds);
  if (s < 3600) return `${Math.floor(s / 60)} min ${s % 60} s`;
  return `${Math.floor(s / 3600)} h ${Math.floor((s % 3600) / 60)} min`;
}

const pad = (n: number, w = 2) => String(n).padStart(w, '0');

/** "00:10:05.3 UTC" (time of day with tenths), for interval ends. */
export function formatUtcTime(epochSeconds: number, withDate = false): string {
  if (!Number.isFinite(epochSeconds)) return '—';
  const d = new Date(Math.round(epochSeconds * 1000));
  const tenths = Math.floor(d.getUTCMilliseconds() / 100);
  const time = `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}:${pad(d.getUTCSeconds())}.${tenths}`;
  const date = `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`;
  return withDate ? `${date} ${time} UTC` : `${time} UTC`;
}

/** Seconds with one decimal and the unit: "12.5 s". */
export function formatSeconds(s: number, digits = 1): string {
  return `${fixed(s, digits)} s`;
}

/** 0..1 → "62 %" (whole percent; "<1 %" for small shares so a real part never reads as nothing). */
export function formatShare(share: number): string {
  if (!Number.isFinite(share)) return '—';
  const p = share * 100;
  if (p > 0 && p < 1) return '<1 %';
  return `${Math.round(p)} %`;
}

export function formatDb(db: number | null | undefined): string {
  return db == null ? '—' : `${fixed(db, 1)} dB`;
}

export function formatDegrees(deg: number): string {
  return `${fixed(deg, 0)}°`;
}

/** A value with its channel unit, at a precision that suits its size ("1.23 °", "14.2 MW"). */
export function formatWithUnit(v: number, unit: string): string {
  const a = Math.abs(v);
  const digits = a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : a >= 0.01 ? 3 : 4;
  const sym = unitSymbol(unit);
  // The degree sign sits on its number ("2.67°"); other units after a space ("14.2 MW").
  return sym === '°' ? `${fixed(v, digits)}°` : `${fixed(v, digits)} ${sym}`;
}

/** Channel units as written after a number (the network stores words such as "deg"). */
export function unitSymbol(unit: string): string {
  if (unit === 'deg' || unit === 'degree' || unit === 'degrees') return '°';
  return unit;
}

export function epochOf(iso: string | null | undefined): number {
  return iso ? Date.parse(iso) / 1000 : Number.NaN;
}

/** Epoch seconds → ISO-8601 UTC with milliseconds (what the API's interval fields take). */
export function isoOf(epochSeconds: number): string {
  return new Date(Math.round(epochSeconds * 1000)).toISOString();
}
