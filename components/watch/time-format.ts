// Ages and durations in words, with their units: "45 s", "12 min", "3 h 5 min", "2 d 4 h".
import { useEffect, useState } from 'react';

/** `coarse`: whole minutes from one minute on (how long an alert has lasted). */
export function formatDuration(seconds: number, opts: { coarse?: boolean } = {}): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '—';
  const s = Math.round(seconds);
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  // Under 10 minutes the seconds matter (a 5-minute staleness limit against "5 min 40 s").
  if (m < 10 && !opts.coarse) return s % 60 ? `${m} min ${s % 60} s` : `${m} min`;
  if (m < 60) return `${m} min`;
  const h = Math.floor(m / 60);
  if (h < 48) return m % 60 ? `${h} h ${m % 60} min` : `${h} h`;
  const d = Math.floor(h / 24);
  return h % 24 ? `${d} d ${h % 24} h` : `${d} d`;
}

/** "just now" under 10 s, otherwise "12 min ago". */
export function formatAge(seconds: number): string {
  if (!Number.isFinite(seconds)) return '—';
  if (seconds < 10) return 'just now';
  return `${formatDuration(seconds)} ago`;
}

/** Time of day in UTC, "14:05 UTC". */
export function formatClock(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const pad = (n: number) => (n < 10 ? `0${n}` : String(n));
  return `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())} UTC`;
}

/** The current time, re-rendering every `everyMs` (ages and durations that keep counting). */
export function useNow(everyMs = 15_000): number {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const t = setInterval(() => setNow(Date.now()), everyMs);
    return () => clearInterval(t);
  }, [everyMs]);
  return now;
}
