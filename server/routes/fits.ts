// Ring-down fits: queue one (engineer/admin) over an interval, read both methods' results.
import { recordAudit } from '../../db/queries/audit';
import { trackIndex } from '../../db/queries/estimates';
import { fitsOfAnalysis, type StoredReconstruction } from '../../db/queries/fits';
import { createAnalysis, getAnalysis, recordingChannelList } from '../../db/queries/scans';
import { enqueueFit } from '../../jobs/processors/analysis-queues';
import type { FitSettings } from '../../jobs/processors/fit';
import { ModalInputError } from '../../modal/errors';
import { checkRingdownOptions } from '../../modal/ringdown';
import type { FitDetailResponse, FitMethodResult } from '../../shared/api/fits';
import type { Deps } from '../deps';
import { NotFoundError, ValidationError } from '../errors';
import { analysisQueues } from '../events/live';
import { estimateBand } from './analysis-dto';
import { analysisSummaries, queueAnalysis, readyRecording } from './scans';
import { route, type RouteDef } from './registry';

/** A fit analysis with its results in the API shape (shared by GET /api/fits/:id and the CSV). */
export async function fitDetail(deps: Deps, id: number): Promise<FitDetailResponse> {
  const a = await getAnalysis(deps.db, { id });
  if (!a || a.kind !== 'fit') throw new NotFoundError(`No fit with id ${id}`);
  const s = a.settings as unknown as FitSettings;
  const [summary] = await analysisSummaries(deps, [a]);
  const tracks = await trackIndex(deps.db);
  const fits = await fitsOfAnalysis(deps.db, { analysisId: a.id });
  const methods: FitMethodResult[] = fits.map(({ fit, estimates }) => {
    const r = fit.reconstruction as unknown as StoredReconstruction;
    return {
      fitId: fit.id,
      method: fit.method as FitMethodResult['method'],
      order: fit.modelOrder,
      snrDb: fit.snrDb,
      analysisRate: r?.analysisRate ?? null,
      modes: estimates.map((e, i) => {
        const t = e.trackId !== null ? tracks.get(e.trackId) : undefined;
        return {
          id: e.id,
          trackCode: t?.code ?? null,
          frequencyHz: e.frequencyHz,
          dampingPercent: e.dampingPercent,
          band: estimateBand(e, t),
          energyShare: e.fitQuality ?? r?.energyShares?.[i] ?? 0,
          channels: r?.residues?.[i] ?? [],
        };
      }),
      reconstruction: {
        startTime: r?.startTime ?? fit.fromTime.toISOString(),
        stepSeconds: r?.stepSeconds ?? 0,
        points: r?.points ?? 0,
        fullPoints: r?.fullPoints ?? 0,
        series: r?.series ?? [],
      },
    };
  });
  return {
    analysis: summary,
    from: new Date(s.from).toISOString(),
    to: new Date(s.to).toISOString(),
    channels: s.channels ?? methods[0]?.reconstruction.series.map((x) => x.channel) ?? [],
    methods,
  };
}

export function fitRoutes(): RouteDef[] {
  return [
    route('fits.create', async ({ deps, params, body, person, ip }) => {
      const rec = await readyRecording(deps, params.id);
      const from = new Date(body.from);
      const to = new Date(body.to);
      // half a sample of slack at each end: the interval may be picked on the sample grid
      const slackMs = 500 / rec.rate;
      if (from.getTime() < rec.startTime.getTime() - slackMs || to.getTime() > rec.endTime.getTime() + slackMs) {
        throw new ValidationError(
          `The interval ${body.from} – ${body.to} is not inside the recording (${rec.startTime.toISOString()} – ${rec.endTime.toISOString()})`,
          [{ path: from.getTime() < rec.startTime.getTime() - slackMs ? 'from' : 'to', message: 'Outside the recording' }],
        );
      }
      const names = (await recordingChannelList(deps.db, { recordingId: rec.id })).map((c) => c.name);
      if (body.channels) {
        const unknown = body.channels.filter((c) => !names.includes(c));
        if (unknown.length) {
          throw new ValidationError(`The recording has no channel ${unknown.map((c) => `"${c}"`).join(', ')}`, [
            { path: 'channels', message: `Not in this recording: ${unknown.join(', ')}` },
          ]);
        }
        if (new Set(body.channels).size !== body.channels.length) {
          throw new ValidationError('A channel is listed twice', [{ path: 'channels', message: 'Listed twice' }]);
        }
      }
      try {
        checkRingdownOptions({ order: body.order, ...(body.bandHz ? { bandHz: body.bandHz } : {}) }, { rate: rec.rate });
      } catch (err) {
        if (err instanceof ModalInputError) throw new ValidationError(`Fit settings refused: ${err.message}`, [{ path: body.bandHz ? 'bandHz' : 'order', message: err.message }]);
        throw err;
      }
      const settings: FitSettings = {
        from: from.toISOString(),
        to: to.toISOString(),
        order: body.order,
        ...(body.channels ? { channels: body.channels } : {}),
        ...(body.bandHz ? { bandHz: body.bandHz } : {}),
      };
      const analysis = await createAnalysis(deps.db, {
        kind: 'fit',
        recordingId: rec.id,
        method: 'prony+matrix-pencil',
        settings: settings as unknown as Record<string, unknown>,
        createdBy: person!.id,
      });
      await recordAudit(deps.db, { personId: person!.id, action: 'fit.start', target: `analysis:${analysis.id}`, details: { recording: rec.id, ...settings }, ip });
      await queueAnalysis(deps, analysis, () => enqueueFit(analysisQueues(deps), { analysisId: analysis.id }));
      const [summary] = await analysisSummaries(deps, [(await getAnalysis(deps.db, { id: analysis.id })) ?? analysis]);
      return { analysis: summary };
    }),

    route('fits.get', async ({ deps, params }) => fitDetail(deps, params.id)),
  ];
}
