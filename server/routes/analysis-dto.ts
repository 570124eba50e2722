// Database rows of the analysis part → the API shapes of shared/api (dates as ISO strings).
import type { AlertWithTrack } from '../../db/queries/alerts';
import type { EstimateRow } from '../../db/queries/estimates';
import type { AnalysisRow } from '../../db/queries/scans';
import type { AlertSummary } from '../../shared/api/alerts';
import type { EstimatePoint, ModeEstimate, ShapeEntry } from '../../shared/api/estimates';
import type { AnalysisSummary } from '../../shared/api/scans';
import { bandOf, DEFAULT_THRESHOLDS, type Band, type BandThresholds } from '../../shared/bands';

export const iso = (d: Date) => d.toISOString();
export const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null);

export function toAnalysisSummary(a: AnalysisRow, extra: { recordingName?: string | null; windows?: number | null } = {}): AnalysisSummary {
  return {
    id: a.id,
    kind: a.kind,
    recordingId: a.recordingId,
    recordingName: extra.recordingName ?? null,
    method: a.method,
    settings: a.settings,
    status: a.status,
    progress: a.progress,
    error: a.error,
    createdAt: iso(a.createdAt),
    startedAt: isoOrNull(a.startedAt),
    finishedAt: isoOrNull(a.finishedAt),
    createdBy: a.createdBy,
    windows: a.kind === 'scan' ? (extra.windows ?? 0) : null,
  };
}

export type TrackInfo = { code: string; name: string; poorBelow: number; lowBelow: number };

export function estimateBand(e: Pick<EstimateRow, 'dampingPercent' | 'forced'>, t: BandThresholds | null | undefined): Band {
  return bandOf(e.dampingPercent, t ?? DEFAULT_THRESHOLDS, e.forced);
}

export function toModeEstimate(e: EstimateRow, tracks: Map<number, TrackInfo>): ModeEstimate {
  const t = e.trackId !== null ? tracks.get(e.trackId) : undefined;
  return {
    id: e.id,
    trackCode: t?.code ?? null,
    at: iso(e.at),
    frequencyHz: e.frequencyHz,
    dampingPercent: e.dampingPercent,
    dampingLo: e.dampingLo,
    dampingHi: e.dampingHi,
    frequencyLo: e.frequencyLo,
    frequencyHi: e.frequencyHi,
    amplitude: e.amplitude,
    fitQuality: e.fitQuality,
    method: e.method,
    forced: e.forced,
    band: estimateBand(e, t),
  };
}

export function toEstimatePoint(e: EstimateRow, t: BandThresholds): EstimatePoint {
  return {
    id: e.id,
    at: iso(e.at),
    frequencyHz: e.frequencyHz,
    dampingPercent: e.dampingPercent,
    dampingLo: e.dampingLo,
    dampingHi: e.dampingHi,
    forced: e.forced,
    band: estimateBand(e, t),
  };
}

export function toShapeEntry(s: ShapeEntry): ShapeEntry {
  return { channel: s.channel, site: s.site, siteName: s.siteName, area: s.area, x: s.x, y: s.y, magnitude: s.magnitude, angleDeg: s.angleDeg };
}

export function toAlertSummary(a: AlertWithTrack, now: Date): AlertSummary {
  const { alert, track } = a;
  const end = alert.clearedAt ?? now;
  return {
    id: alert.id,
    trackCode: track.code,
    trackName: track.name,
    kind: alert.kind,
    state: alert.state,
    level: alert.level,
    openedAt: iso(alert.openedAt),
    escalatedAt: isoOrNull(alert.escalatedAt),
    clearedAt: isoOrNull(alert.clearedAt),
    durationSeconds: Math.max(0, (end.getTime() - alert.openedAt.getTime()) / 1000),
    worstDamping: alert.worstDamping,
    worstEstimateId: alert.worstEstimateId,
    poorBelow: track.poorBelow,
    lowBelow: track.lowBelow,
    acknowledgedBy: alert.acknowledgedBy !== null && a.acknowledgedByName !== null ? { id: alert.acknowledgedBy, displayName: a.acknowledgedByName } : null,
    acknowledgedAt: isoOrNull(alert.acknowledgedAt),
    note: alert.note,
  };
}
