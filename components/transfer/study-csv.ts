// The study's windows as CSV (RFC 4180, standard: comma-separated, CRLF line ends, quoted fields
// where needed), built in the browser from the study the screen shows. The server has no CSV
// endpoint for a transfer study; this file is the same data the charts draw.
import type { TransferStudy } from '@/shared/api/studies';

export const STUDY_CSV_COLUMNS = [
  'window_start_utc',
  'window_end_utc',
  'transfer_mw',
  'damping_percent',
  'damping_lo_percent',
  'damping_hi_percent',
  'corridor_angle_deg',
  'forced',
  'analysis_id',
] as const;

function field(v: string | number | boolean | null): string {
  if (v === null) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function studyCsv(s: TransferStudy): string {
  const lines = [STUDY_CSV_COLUMNS.join(',')];
  for (const p of s.points) {
    lines.push([p.start, p.end, p.transferMw, p.dampingPercent, p.dampingLo, p.dampingHi, p.angleDeg, p.forced, p.analysisId].map(field).join(','));
  }
  return lines.join('\r\n') + '\r\n';
}

export function studyCsvName(s: TransferStudy): string {
  return `keel-transfer-${s.track.code}-${s.corridor.code}-${s.from.slice(0, 10)}-${s.to.slice(0, 10)}.csv`;
}
