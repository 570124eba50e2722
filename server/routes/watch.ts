// Watch: every mode track with its newest estimate, a 24-hour sparkline, open alerts and staleness.
import { listAlerts, listTracks } from '../../db/queries/alerts';
import { latestByTrack, tracksEstimateBuckets } from '../../db/queries/estimates';
import { corridorChannelNames } from '../../db/queries/scans';
import { ADVISORY_CAUTION } from '../../shared/api/alerts';
import { SPARKLINE_BUCKET_MINUTES, SPARKLINE_HOURS, type WatchResponse, type WatchTrack } from '../../shared/api/watch';
import type { Deps } from '../deps';
import { readCache } from '../events/live';
import { estimateBand, iso, toAlertSummary } from './analysis-dto';
import { JsonAnswer, route, type RouteDef } from './registry';

/** A track is stale when no estimate came for 3 scan steps (at least 5 minutes). */
export function staleAfterSeconds(stepSeconds: number | null): number {
  return Math.max(300, 3 * (stepSeconds ?? 60));
}

/** What Watch reads from the database. */
async function watchData(deps: Deps) {
  const [tracks, corridorRows, open] = await Promise.all([
    listTracks(deps.db),
    corridorChannelNames(deps.db),
    listAlerts(deps.db, { notCleared: true, limit: 500 }),
  ]);
  const corridors = new Map(corridorRows.map((c) => [c.id, c]));
  const latest = await latestByTrack(deps.db, { trackIds: tracks.map((t) => t.id) });
  // every track's sparkline in one statement (a few hundred rollup rows: see tracksEstimateBuckets)
  const spark = await tracksEstimateBuckets(deps.db, {
    ranges: [...latest.values()].map((l) => ({
      trackId: l.estimate.trackId!,
      from: new Date(l.estimate.at.getTime() - SPARKLINE_HOURS * 3600 * 1000),
      to: l.estimate.at,
    })),
    bucketSeconds: SPARKLINE_BUCKET_MINUTES * 60,
    naturalOnly: true,
  });
  return { tracks, corridors, open, latest, spark };
}

export function watchRoutes(): RouteDef[] {
  return [
    // One snapshot (taken at generatedAt, ages and staleness as of then) serves every poll for up
    // to READ_CACHE_MS; any new estimate or alert event empties the cache (server/read-cache.ts).
    route('watch.get', ({ deps }) => readCache(deps).get('watch', async () => new JsonAnswer(await watchSnapshot(deps)))),
  ];
}

async function watchSnapshot(deps: Deps): Promise<WatchResponse> {
  const { tracks, corridors, open, latest, spark } = await watchData(deps);
  const now = deps.now();
  const out: WatchTrack[] = tracks.map((t): WatchTrack => {
    const l = latest.get(t.id);
    const staleAfter = staleAfterSeconds(l?.stepSeconds ?? null);
    const sparkline: WatchTrack['sparkline'] = (spark.get(t.id) ?? [])
      .filter((b) => b.dampingMin !== null)
      .map((b) => ({ t: iso(b.start), min: b.dampingMin!, mean: b.dampingMean!, max: b.dampingMax! }));
    const ageSeconds = l ? Math.max(0, (now.getTime() - l.estimate.at.getTime()) / 1000) : null;
    const corridor = t.corridorId !== null ? corridors.get(t.corridorId) : undefined;
    return {
      code: t.code,
      name: t.name,
      description: t.description,
      minHz: t.minHz,
      maxHz: t.maxHz,
      poorBelow: t.poorBelow,
      lowBelow: t.lowBelow,
      corridor: corridor ? { code: corridor.code, name: corridor.name } : null,
      latest: l
        ? {
            estimateId: l.estimate.id,
            at: iso(l.estimate.at),
            ageSeconds: ageSeconds!,
            frequencyHz: l.estimate.frequencyHz,
            dampingPercent: l.estimate.dampingPercent,
            dampingLo: l.estimate.dampingLo,
            dampingHi: l.estimate.dampingHi,
            forced: l.estimate.forced,
            band: estimateBand(l.estimate, t),
            method: l.estimate.method,
          }
        : null,
      stale: ageSeconds === null || ageSeconds > staleAfter,
      staleAfterSeconds: staleAfter,
      sparkline,
      openAlerts: open.filter((a) => a.alert.trackId === t.id).map((a) => toAlertSummary(a, now)),
    };
  });
  return { generatedAt: iso(now), tracks: out, caution: ADVISORY_CAUTION };
}
