// Transfer in MW: whole megawatts, typographic minus, unit always written.
export function formatMw(v: number | null | undefined): string {
  if (v == null || !Number.isFinite(v)) return '—';
  const r = Math.round(v);
  return `${r < 0 ? '−' : ''}${Math.abs(r)} MW`;
}

export function formatMwRange(lo: number | null, hi: number | null): string {
  if (lo == null || hi == null) return 'unbounded';
  return `${formatMw(lo).replace(' MW', '')}–${formatMw(hi)}`;
}
