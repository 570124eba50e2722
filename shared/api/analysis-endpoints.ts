// Catalogue entries of the analysis part of the API (scans, fits, Watch, trends, alerts, transfer
// studies, live events), spread into ENDPOINTS (./endpoints.ts). Order matters where two paths
// overlap: a literal path ('/api/studies/transfer', '/api/studies/transfer.csv', '/api/fits/:id.csv')
// comes before its parameter sibling, and the server mounts routes in the order of
// server/routes/analysis-routes.ts.
//
// Endpoints answering something other than JSON (text/csv, text/event-stream) declare
// `response: z.undefined()`: their handlers write the body themselves.
import { z } from 'zod';
import type { EndpointDef } from './endpoints';
import { idParamsSchema } from './common';
import { acknowledgeBodySchema, alertDetailResponseSchema, alertIdParamsSchema, alertResponseSchema, alertsQuerySchema, alertsResponseSchema } from './alerts';
import {
  estimateDetailResponseSchema,
  estimateIdParamsSchema,
  estimatesCsvQuerySchema,
  estimatesQuerySchema,
  trackCodeParamsSchema,
  trackEstimatesResponseSchema,
} from './estimates';
import { fitCreateBodySchema, fitDetailResponseSchema, fitIdParamsSchema } from './fits';
import { analysesQuerySchema, analysesResponseSchema, analysisResponseSchema, scanCreateBodySchema, scanResultsResponseSchema } from './scans';
import {
  savedStudiesResponseSchema,
  savedStudyResponseSchema,
  studyIdParamsSchema,
  studySaveBodySchema,
  transferStudyQuerySchema,
  transferStudyResponseSchema,
} from './studies';
import { watchResponseSchema } from './watch';

const e = <T extends EndpointDef>(d: T) => d;
/** Body written by the handler itself (CSV, event stream). */
const raw = z.undefined();

export const ANALYSIS_ENDPOINTS = {
  // scans and fits
  'scans.create': e({ method: 'POST', path: '/api/recordings/:id/scans', access: 'runAnalysis', status: 201, summary: 'Queue an ambient scan of a recording', params: idParamsSchema, body: scanCreateBodySchema, response: analysisResponseSchema }),
  'fits.create': e({ method: 'POST', path: '/api/recordings/:id/fits', access: 'runAnalysis', status: 201, summary: 'Queue a ring-down fit (Prony and matrix pencil) of an interval', params: idParamsSchema, body: fitCreateBodySchema, response: analysisResponseSchema }),
  'analyses.list': e({ method: 'GET', path: '/api/analyses', access: 'view', status: 200, summary: 'Analyses (scans, fits, ingests), newest first', query: analysesQuerySchema, response: analysesResponseSchema }),
  'scans.get': e({ method: 'GET', path: '/api/scans/:id', access: 'view', status: 200, summary: "A scan's windows and their modes", params: idParamsSchema, response: scanResultsResponseSchema }),
  'fits.csv': e({ method: 'GET', path: '/api/fits/:id.csv', access: 'view', status: 200, summary: "A fit's modes per method and channel as CSV", params: fitIdParamsSchema, response: raw }),
  'fits.get': e({ method: 'GET', path: '/api/fits/:id', access: 'view', status: 200, summary: 'A fit: both methods’ modes and reconstructions', params: fitIdParamsSchema, response: fitDetailResponseSchema }),

  // Watch and trends
  'watch.get': e({ method: 'GET', path: '/api/watch', access: 'view', status: 200, summary: 'Every mode track: latest estimate, 24-hour sparkline, open alerts, staleness', response: watchResponseSchema }),
  'estimates.csv': e({ method: 'GET', path: '/api/tracks/:code/estimates.csv', access: 'view', status: 200, summary: "A track's estimates over a period as CSV", params: trackCodeParamsSchema, query: estimatesCsvQuerySchema, response: raw }),
  'estimates.list': e({ method: 'GET', path: '/api/tracks/:code/estimates', access: 'view', status: 200, summary: "A track's estimates over a period (raw or bucketed)", params: trackCodeParamsSchema, query: estimatesQuerySchema, response: trackEstimatesResponseSchema }),
  'estimates.get': e({ method: 'GET', path: '/api/estimates/:id', access: 'view', status: 200, summary: 'One estimate with its mode shape', params: estimateIdParamsSchema, response: estimateDetailResponseSchema }),

  // alerts
  'alerts.list': e({ method: 'GET', path: '/api/alerts', access: 'view', status: 200, summary: 'Alerts, newest first', query: alertsQuerySchema, response: alertsResponseSchema }),
  'alerts.get': e({ method: 'GET', path: '/api/alerts/:id', access: 'view', status: 200, summary: 'An alert with its damping trace, worst mode shape, notifications and history', params: alertIdParamsSchema, response: alertDetailResponseSchema }),
  'alerts.acknowledge': e({ method: 'POST', path: '/api/alerts/:id/acknowledge', access: 'acknowledgeAlert', status: 200, summary: 'Acknowledge an alert with a note', params: alertIdParamsSchema, body: acknowledgeBodySchema, response: alertResponseSchema }),

  // transfer studies
  'studies.transferCsv': e({ method: 'GET', path: '/api/studies/transfer.csv', access: 'runStudy', status: 200, summary: "Every window of a transfer study's period as CSV (the study's answer draws a sample of them)", query: transferStudyQuerySchema, response: raw }),
  'studies.transfer': e({ method: 'GET', path: '/api/studies/transfer', access: 'runStudy', status: 200, summary: "Run a transfer study of a track's damping against its corridor's MW", query: transferStudyQuerySchema, response: transferStudyResponseSchema }),
  'studies.save': e({ method: 'POST', path: '/api/studies', access: 'runStudy', status: 201, summary: 'Run a transfer study and save it', body: studySaveBodySchema, response: savedStudyResponseSchema }),
  'studies.list': e({ method: 'GET', path: '/api/studies', access: 'view', status: 200, summary: 'Saved transfer studies, newest first', response: savedStudiesResponseSchema }),
  'studies.get': e({ method: 'GET', path: '/api/studies/:id', access: 'view', status: 200, summary: 'A saved transfer study', params: studyIdParamsSchema, response: savedStudyResponseSchema }),

  // live updates
  'events.stream': e({ method: 'GET', path: '/api/events', access: 'view', status: 200, summary: 'Server-Sent Events: analysis progress and alert changes (text/event-stream)', response: raw }),
} as const satisfies Record<string, EndpointDef>;
