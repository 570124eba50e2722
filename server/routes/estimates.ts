// Trends: a track's estimates over a period (raw or in buckets), and one estimate with its shape.
import { getTrack } from '../../db/queries/alerts';
import { countTrackEstimates, estimateDetail, latestEstimateAt, shapeOf, trackEstimateBuckets, trackEstimates, trackIndex } from '../../db/queries/estimates';
import { bandOf } from '../../shared/bands';
import type { Deps } from '../deps';
import { NotFoundError } from '../errors';
import { readCache } from '../events/live';
import { iso, toEstimatePoint, toModeEstimate, toShapeEntry } from './analysis-dto';
import { JsonAnswer, route, type RouteContext, type RouteDef } from './registry';

/** Bucket widths a chart can label nicely, seconds. */
const NICE_BUCKETS = [60, 120, 300, 600, 900, 1800, 3600, 7200, 10_800, 21_600, 43_200, 86_400, 2 * 86_400, 7 * 86_400];

/** The smallest nice width that leaves at most maxPoints buckets over the span. */
export function bucketSecondsFor(spanSeconds: number, maxPoints: number): number {
  const min = spanSeconds / maxPoints;
  return NICE_BUCKETS.find((b) => b >= min) ?? Math.ceil(min / 86_400) * 86_400;
}

type ListQuery = RouteContext<'estimates.list'>['query'];

async function trackEstimatesAnswer(deps: Deps, code: string, query: ListQuery) {
  const track = await getTrack(deps.db, { code });
  if (!track) throw new NotFoundError(`No mode track with code "${code}"`);
  const latest = await latestEstimateAt(deps.db, { trackId: track.id });
  const to = query.to ? new Date(query.to) : (latest ?? deps.now());
  const from = query.from ? new Date(query.from) : new Date(to.getTime() - 24 * 3600 * 1000);
  const naturalOnly = query.naturalOnly === 'true';
  const total = await countTrackEstimates(deps.db, { trackId: track.id, from, to, naturalOnly });
  const t = { poorBelow: track.poorBelow, lowBelow: track.lowBelow };
  const base = {
    track: { code: track.code, name: track.name, poorBelow: track.poorBelow, lowBelow: track.lowBelow, minHz: track.minHz, maxHz: track.maxHz },
    from: iso(from),
    to: iso(to),
    total,
  };
  if (total <= query.maxPoints) {
    const rows = await trackEstimates(deps.db, { trackId: track.id, from, to, naturalOnly });
    return { ...base, aggregated: false, bucketSeconds: null, points: rows.map((e) => toEstimatePoint(e, t)), buckets: [] };
  }
  const bucketSeconds = bucketSecondsFor((to.getTime() - from.getTime()) / 1000, query.maxPoints);
  const buckets = await trackEstimateBuckets(deps.db, { trackId: track.id, from, to, bucketSeconds, naturalOnly });
  return {
    ...base,
    aggregated: true,
    bucketSeconds,
    points: [],
    buckets: buckets.map((b) => ({
      start: iso(b.start),
      count: b.count,
      dampingMin: b.dampingMin,
      dampingMean: b.dampingMean,
      dampingMax: b.dampingMax,
      dampingLoMean: b.dampingLoMean,
      dampingHiMean: b.dampingHiMean,
      frequencyMean: b.frequencyMean,
      forcedCount: b.forcedCount,
      band: b.dampingMin === null ? ('forced' as const) : bandOf(b.dampingMin, t),
    })),
  };
}

export function estimateRoutes(): RouteDef[] {
  return [
    // The answer holds no clock (only stored rows), so all of it is shared through the read cache.
    route('estimates.list', ({ deps, params, query }) =>
      readCache(deps).get(
        `estimates:${params.code}:${query.from ?? ''}:${query.to ?? ''}:${query.maxPoints}:${query.naturalOnly ?? ''}`,
        async () => new JsonAnswer(await trackEstimatesAnswer(deps, params.code, query)),
      ),
    ),

    route('estimates.get', async ({ deps, params }) => {
      const d = await estimateDetail(deps.db, { id: params.id });
      if (!d) throw new NotFoundError(`No estimate with id ${params.id}`);
      const tracks = await trackIndex(deps.db);
      const shape = await shapeOf(deps.db, { estimateId: d.estimate.id });
      const source = d.window
        ? { kind: 'window' as const, windowId: d.window.id, analysisId: d.window.analysisId, start: iso(d.window.start), end: iso(d.window.end) }
        : { kind: 'fit' as const, fitId: d.fit!.id, analysisId: d.fit!.analysisId, from: iso(d.fit!.from), to: iso(d.fit!.to) };
      return {
        estimate: { ...toModeEstimate(d.estimate, tracks), trackName: d.track?.name ?? null, source },
        shape: shape.map(toShapeEntry),
      };
    }),
  ];
}
