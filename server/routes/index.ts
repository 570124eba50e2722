// Every route of the API, in one list. mountRoutes() refuses to start if an endpoint of
// shared/api/endpoints.ts has no handler here or one is registered twice.
import type { KeelPassport } from '../auth/session';
import { authRoutes } from './auth';
import { healthRoutes } from './health';
import { invitationRoutes } from './invitations';
import { networkRoutes } from './network';
import { analysisRoutes } from './analyses';
import { outboxRoutes } from './outbox';
import { passwordResetRoutes } from './password-reset';
import { peopleRoutes } from './people';
import { recordingRoutes } from './recordings';
import { coreAnalysisRoutes } from './analysis-routes';
import type { RouteDef } from './registry';

export function allRoutes(passport: KeelPassport): RouteDef[] {
  return [
    ...healthRoutes(),
    ...authRoutes(passport),
    ...peopleRoutes(),
    ...invitationRoutes(),
    ...passwordResetRoutes(),
    ...outboxRoutes(),
    ...networkRoutes(),
    ...recordingRoutes(),
    ...analysisRoutes(),
    ...coreAnalysisRoutes(),
  ];
}
