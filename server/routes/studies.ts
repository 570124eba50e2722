// Transfer studies: run one over a period (admin, engineer, planner), save it, list and read saved ones.
import { getTrack } from '../../db/queries/alerts';
import { recordAudit } from '../../db/queries/audit';
import { studyRows } from '../../db/queries/estimates';
import { corridorChannelNames } from '../../db/queries/scans';
import { getStudy, insertStudy, listStudies, type StudyWithNames } from '../../db/queries/studies';
import { STUDY_CAUTION, type SavedStudySummary, type TransferStudy } from '../../shared/api/studies';
import type { Deps } from '../deps';
import { ConflictError, NotFoundError } from '../errors';
import { buildTransferStudy, type StudyPoint } from '../studies/transfer';
import { iso } from './analysis-dto';
import { route, type RouteDef } from './registry';

export async function runTransferStudy(deps: Deps, q: { track: string; from: string; to: string }): Promise<{ study: TransferStudy; trackId: number; corridorId: number }> {
  const track = await getTrack(deps.db, { code: q.track });
  if (!track) throw new NotFoundError(`No mode track with code "${q.track}"`);
  const corridor = track.corridorId !== null ? (await corridorChannelNames(deps.db)).find((c) => c.id === track.corridorId) : undefined;
  if (!corridor) throw new ConflictError(`Track "${track.code}" has no corridor to study its damping against; set one in Network`);
  const from = new Date(q.from);
  const to = new Date(q.to);
  const rows = await studyRows(deps.db, { trackId: track.id, corridorCode: corridor.code, from, to });
  // one estimate per window start: where scans overlap, the newest analysis wins
  const byStart = new Map<number, (typeof rows)[number]>();
  for (const r of rows) {
    const k = r.start.getTime();
    const prev = byStart.get(k);
    if (!prev || r.analysisId > prev.analysisId) byStart.set(k, r);
  }
  const points: StudyPoint[] = [];
  for (const r of byStart.values()) {
    if (r.transferMw === null) continue;
    const step = (r.settings as { stepSeconds?: unknown }).stepSeconds;
    points.push({
      analysisId: r.analysisId,
      windowStart: r.start.getTime() / 1000,
      windowSeconds: (r.end.getTime() - r.start.getTime()) / 1000,
      stepSeconds: typeof step === 'number' ? step : 60,
      dampingPercent: r.dampingPercent,
      ciLow: r.dampingLo ?? r.dampingPercent,
      ciHigh: r.dampingHi ?? r.dampingPercent,
      transferMw: r.transferMw,
      angleDeg: r.angleDeg,
      forced: r.forced,
    });
  }
  points.sort((a, b) => a.windowStart - b.windowStart);
  const result = buildTransferStudy(points, { poorBelow: track.poorBelow, lowBelow: track.lowBelow });
  const ci = new Map(points.map((p) => [p.windowStart, p]));
  return {
    trackId: track.id,
    corridorId: corridor.id,
    study: {
      track: { code: track.code, name: track.name, poorBelow: track.poorBelow, lowBelow: track.lowBelow },
      corridor: { code: corridor.code, name: corridor.name },
      from: iso(from),
      to: iso(to),
      method: result.method,
      confidenceLevel: result.confidenceLevel,
      points: result.points.map((p) => {
        const raw = byStart.get(p.windowStart * 1000)!;
        return {
          analysisId: p.analysisId,
          start: iso(raw.start),
          end: iso(raw.end),
          transferMw: p.transferMw,
          dampingPercent: p.dampingPercent,
          dampingLo: raw.dampingLo,
          dampingHi: raw.dampingHi,
          angleDeg: ci.get(p.windowStart)?.angleDeg ?? null,
          forced: p.forced,
        };
      }),
      pointsUsed: result.pointsUsed,
      pointsForced: result.pointsForced,
      nEffective: result.nEffective,
      damping: result.damping,
      angle: result.angle,
      caution: STUDY_CAUTION,
    },
  };
}

function toSavedSummary(s: StudyWithNames): SavedStudySummary {
  const r = s.study.result as unknown as TransferStudy;
  const proj = (kind: 'low' | 'poor') => r?.damping?.projections?.find((p) => p.threshold === kind)?.x ?? null;
  return {
    id: s.study.id,
    name: s.study.name,
    trackCode: s.trackCode,
    corridorCode: s.corridorCode,
    from: iso(s.study.periodFrom),
    to: iso(s.study.periodTo),
    createdAt: iso(s.study.createdAt),
    createdBy: s.study.createdBy !== null && s.createdByName !== null ? { id: s.study.createdBy, displayName: s.createdByName } : null,
    poorAtMw: proj('poor'),
    lowAtMw: proj('low'),
  };
}

export function studyRoutes(): RouteDef[] {
  return [
    route('studies.transfer', async ({ deps, query }) => ({ study: (await runTransferStudy(deps, query)).study })),

    route('studies.save', async ({ deps, body, person, ip }) => {
      const run = await runTransferStudy(deps, body);
      const row = await insertStudy(deps.db, {
        name: body.name,
        trackId: run.trackId,
        corridorId: run.corridorId,
        from: new Date(body.from),
        to: new Date(body.to),
        result: run.study as unknown as Record<string, unknown>,
        createdBy: person!.id,
      });
      await recordAudit(deps.db, { personId: person!.id, action: 'study.save', target: `study:${row.id}`, details: { name: body.name, track: body.track }, ip });
      const saved = (await getStudy(deps.db, { id: row.id }))!;
      return { saved: { ...toSavedSummary(saved), result: run.study } };
    }),

    route('studies.list', async ({ deps }) => ({ studies: (await listStudies(deps.db)).map(toSavedSummary) })),

    route('studies.get', async ({ deps, params }) => {
      const s = await getStudy(deps.db, { id: params.id });
      if (!s) throw new NotFoundError(`No saved study with id ${params.id}`);
      return { saved: { ...toSavedSummary(s), result: s.study.result as unknown as TransferStudy } };
    }),
  ];
}
