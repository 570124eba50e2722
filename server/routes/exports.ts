// CSV exports: a track's estimates over a period, every window of a transfer study's period, and a
// fit's modes per method and channel. RFC 4180 text (standard): comma-separated, CRLF line ends,
// fields with a comma, quote or line break quoted with doubled quotes. Estimates are written page by
// page (keyset paging), study windows a day of window starts at a time, so a long period never sits
// in memory whole.
import type { Response } from 'express';
import { getTrack } from '../../db/queries/alerts';
import { trackEstimates, latestEstimateAt } from '../../db/queries/estimates';
import { studyWindowPages } from '../../db/queries/studies';
import { ESTIMATES_CSV_COLUMNS } from '../../shared/api/estimates';
import { FIT_CSV_COLUMNS } from '../../shared/api/fits';
import { STUDY_CSV_COLUMNS } from '../../shared/api/studies';
import { NotFoundError } from '../errors';
import { estimateBand } from './analysis-dto';
import { fitDetail } from './fits';
import { route, type RouteDef } from './registry';
import { studySubject } from './studies';

export function csvField(v: string | number | boolean | null | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function csvLine(fields: (string | number | boolean | null | undefined)[]): string {
  return fields.map(csvField).join(',') + '\r\n';
}

function startCsv(res: Response, fileName: string): void {
  res.status(200);
  res.set('Content-Type', 'text/csv; charset=utf-8');
  res.set('Content-Disposition', `attachment; filename="${fileName.replace(/[^A-Za-z0-9._-]/g, '_')}"`);
}

/** Waits for the socket to drain when the kernel buffer is full (back-pressure), or to close (client gone). */
function write(res: Response, chunk: string): Promise<void> {
  if (res.write(chunk)) return Promise.resolve();
  return new Promise((resolve) => {
    const done = () => {
      res.off('drain', done);
      res.off('close', done);
      resolve();
    };
    res.on('drain', done);
    res.on('close', done);
  });
}

const PAGE = 5000;

export function exportRoutes(): RouteDef[] {
  return [
    route('estimates.csv', async ({ deps, params, query, res }) => {
      const track = await getTrack(deps.db, { code: params.code });
      if (!track) throw new NotFoundError(`No mode track with code "${params.code}"`);
      const latest = await latestEstimateAt(deps.db, { trackId: track.id });
      const to = query.to ? new Date(query.to) : (latest ?? deps.now());
      const from = query.from ? new Date(query.from) : new Date(to.getTime() - 24 * 3600 * 1000);
      startCsv(res, `keel-${track.code}-estimates-${from.toISOString().slice(0, 10)}.csv`);
      await write(res, csvLine([...ESTIMATES_CSV_COLUMNS]));
      let after: { at: Date; id: number } | undefined;
      for (;;) {
        const rows = await trackEstimates(deps.db, { trackId: track.id, from, to, limit: PAGE, after });
        let chunk = '';
        for (const e of rows) {
          chunk += csvLine([
            e.at.toISOString(),
            track.code,
            e.frequencyHz,
            e.dampingPercent,
            e.dampingLo,
            e.dampingHi,
            estimateBand(e, track),
            e.forced,
            e.method,
            e.id,
          ]);
        }
        if (chunk) await write(res, chunk);
        if (rows.length < PAGE) break;
        const last = rows[rows.length - 1];
        after = { at: last.at, id: last.id };
      }
      res.end();
      return undefined;
    }),

    // Every window of a transfer study's period (the study's answer draws at most a sample of them),
    // the same windows its figures are computed from; same access rule as running the study.
    route('studies.transferCsv', async ({ deps, query, res }) => {
      const { track, corridor } = await studySubject(deps, query.track);
      const from = new Date(query.from);
      const to = new Date(query.to);
      startCsv(res, `keel-transfer-${track.code}-${corridor.code}-${query.from.slice(0, 10)}-${query.to.slice(0, 10)}.csv`);
      await write(res, csvLine([...STUDY_CSV_COLUMNS]));
      const iso = (ms: number) => new Date(ms).toISOString();
      for await (const page of studyWindowPages(deps.db, { trackId: track.id, corridorCode: corridor.code, from, to })) {
        if (res.destroyed) break; // the client went away: stop reading the period
        let chunk = '';
        for (const w of page) {
          chunk += csvLine([iso(w.startMs), iso(w.endMs), w.transferMw, w.dampingPercent, w.dampingLo, w.dampingHi, w.angleDeg, w.forced, w.analysisId]);
        }
        await write(res, chunk);
      }
      res.end();
      return undefined;
    }),

    route('fits.csv', async ({ deps, params, res }) => {
      const d = await fitDetail(deps, params.id);
      let out = csvLine([...FIT_CSV_COLUMNS]);
      for (const m of d.methods) {
        m.modes.forEach((mode, k) => {
          for (const c of mode.channels) {
            out += csvLine([m.method, k + 1, mode.frequencyHz, mode.dampingPercent, mode.energyShare, mode.trackCode, c.channel, c.amplitude, c.phaseDeg, m.order, m.snrDb, d.from, d.to]);
          }
        });
      }
      startCsv(res, `keel-fit-${d.analysis.id}.csv`);
      res.end(out);
      return undefined;
    }),
  ];
}
