// The analysis part of the API in mount order (literal paths before their parameter siblings:
// /api/fits/:id.csv before /api/fits/:id, /api/studies/transfer before /api/studies/:id,
// /api/tracks/:code/estimates.csv before /api/tracks/:code/estimates).
import { alertRoutes } from './alerts';
import { estimateRoutes } from './estimates';
import { eventRoutes } from './events';
import { exportRoutes } from './exports';
import { fitRoutes } from './fits';
import type { RouteDef } from './registry';
import { scanRoutes } from './scans';
import { studyRoutes } from './studies';
import { watchRoutes } from './watch';

export function coreAnalysisRoutes(): RouteDef[] {
  return [...exportRoutes(), ...scanRoutes(), ...fitRoutes(), ...watchRoutes(), ...estimateRoutes(), ...alertRoutes(), ...studyRoutes(), ...eventRoutes()];
}
