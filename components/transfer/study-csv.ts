// The study's CSV export: a same-origin link to the server's export of EVERY window of the study's
// period (GET /api/studies/transfer.csv, streamed from the database; columns STUDY_CSV_COLUMNS in
// shared/api/studies.ts). The answer the screen draws holds at most a sample of the windows, so the
// file is not built from it.
import { ENDPOINTS } from '@/shared/api/endpoints';
import type { TransferStudy } from '@/shared/api/studies';

export function studyCsvUrl(s: Pick<TransferStudy, 'track' | 'from' | 'to'>): string {
  const base = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');
  const q = `track=${encodeURIComponent(s.track.code)}&from=${encodeURIComponent(s.from)}&to=${encodeURIComponent(s.to)}`;
  return `${base}${ENDPOINTS['studies.transferCsv'].path}?${q}`;
}

export function studyCsvName(s: Pick<TransferStudy, 'track' | 'corridor' | 'from' | 'to'>): string {
  return `keel-transfer-${s.track.code}-${s.corridor.code}-${s.from.slice(0, 10)}-${s.to.slice(0, 10)}.csv`;
}
