// One analysis of any kind (ingest, scan, fit): its status, progress 0..1 and failure reason —
// what an upload answered with 202 is followed by.
import { getAnalysis } from '../../db/queries/scans';
import { NotFoundError } from '../errors';
import { route, type RouteDef } from './registry';
import { analysisSummaries } from './scans';

export function analysisRoutes(): RouteDef[] {
  return [
    route('analyses.get', async ({ deps, params }) => {
      const row = await getAnalysis(deps.db, { id: params.id });
      if (!row) throw new NotFoundError(`No analysis with id ${params.id}`);
      const [analysis] = await analysisSummaries(deps, [row]);
      return { analysis };
    }),
  ];
}
