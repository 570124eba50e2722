// Transfer studies: run one over a period (admin, engineer, planner), save it, list and read saved ones.
// The figures cover every window of the period; the answer's points are the bounded display sample
// (shared/api/studies.ts), and what is saved is that same answer. Every window as CSV:
// GET /api/studies/transfer.csv (server/routes/exports.ts).
import { getTrack } from '../../db/queries/alerts';
import { recordAudit } from '../../db/queries/audit';
import { corridorChannelNames } from '../../db/queries/scans';
import { getStudy, insertStudy, listStudies, studyWindows, type SavedStudyListRow } from '../../db/queries/studies';
import { STUDY_CAUTION, type SavedStudySummary, type TransferStudy } from '../../shared/api/studies';
import type { Deps } from '../deps';
import { ConflictError, NotFoundError } from '../errors';
import { readCache } from '../events/live';
import { sampleDisplayPoints } from '../studies/sample';
import { computeTransferStudy } from '../studies/transfer';
import { iso } from './analysis-dto';
import { JsonAnswer, route, type RouteDef } from './registry';

/** The track of a study and the corridor it is studied against (404 / 409 when there is none). */
export async function studySubject(deps: Deps, trackCode: string) {
  const track = await getTrack(deps.db, { code: trackCode });
  if (!track) throw new NotFoundError(`No mode track with code "${trackCode}"`);
  const corridor = track.corridorId !== null ? (await corridorChannelNames(deps.db)).find((c) => c.id === track.corridorId) : undefined;
  if (!corridor) throw new ConflictError(`Track "${track.code}" has no corridor to study its damping against; set one in Network`);
  return { track, corridor };
}

export async function runTransferStudy(deps: Deps, q: { track: string; from: string; to: string }): Promise<{ study: TransferStudy; trackId: number; corridorId: number }> {
  const { track, corridor } = await studySubject(deps, q.track);
  const from = new Date(q.from);
  const to = new Date(q.to);
  // every window of the period, as typed columns; the figures use all of them, the answer's
  // points only the display sample
  const w = await studyWindows(deps.db, { trackId: track.id, corridorCode: corridor.code, from, to });
  const result = computeTransferStudy(w, { poorBelow: track.poorBelow, lowBelow: track.lowBelow });
  const orNull = (v: number) => (Number.isNaN(v) ? null : v);
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
      points: result.shown.map((i) => ({
        analysisId: w.analysisId[i],
        start: iso(new Date(w.startMs[i])),
        end: iso(new Date(w.endMs[i])),
        transferMw: w.transferMw[i],
        dampingPercent: w.dampingPercent[i],
        dampingLo: orNull(w.dampingLo[i]),
        dampingHi: orNull(w.dampingHi[i]),
        angleDeg: orNull(w.angleDeg[i]),
        forced: w.forced[i] === 1,
      })),
      pointsTotal: result.pointsTotal,
      pointsShown: result.pointsShown,
      pointsSampled: result.pointsSampled,
      pointsUsed: result.pointsUsed,
      pointsForced: result.pointsForced,
      nEffective: result.nEffective,
      damping: result.damping,
      angle: result.angle,
      caution: STUDY_CAUTION,
    },
  };
}

/**
 * A stored answer as the API gives it. Studies saved before answers carried a display sample hold
 * every window in `points` and no counts: the sample and the counts are made on reading (the
 * stored row is left as it is).
 */
export function storedStudyAnswer(result: Record<string, unknown>): TransferStudy {
  const r = result as unknown as TransferStudy;
  if (typeof (result as { pointsTotal?: unknown }).pointsTotal === 'number') return r;
  const all = Array.isArray(r.points) ? r.points : [];
  const points = sampleDisplayPoints(all);
  return { ...r, points, pointsTotal: all.length, pointsShown: points.length, pointsSampled: points.length < all.length };
}

function toSavedSummary(s: SavedStudyListRow): SavedStudySummary {
  return {
    id: s.id,
    name: s.name,
    trackCode: s.trackCode,
    corridorCode: s.corridorCode,
    from: iso(s.periodFrom),
    to: iso(s.periodTo),
    createdAt: iso(s.createdAt),
    createdBy: s.createdBy !== null && s.createdByName !== null ? { id: s.createdBy, displayName: s.createdByName } : null,
    poorAtMw: s.poorAtMw,
    lowAtMw: s.lowAtMw,
  };
}

export function studyRoutes(): RouteDef[] {
  return [
    // Stored rows only (no clock): planners opening the screen ask for the same hour-rounded
    // period, so concurrent runs share one computation through the read cache.
    route('studies.transfer', ({ deps, query }) =>
      readCache(deps).get(`study:${query.track}:${query.from}:${query.to}`, async () => new JsonAnswer({ study: (await runTransferStudy(deps, query)).study })),
    ),

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
      return { saved: { ...toSavedSummary(s), result: storedStudyAnswer(s.result) } };
    }),
  ];
}
