// Recordings (uploaded PMU data) and the ingest of an upload.
//
// POST /api/recordings                     (runAnalysis: admin, engineer)  multipart/form-data
//   fields: `file` — one .csv, one .cff, or a COMTRADE .cfg and its .dat (two `file` parts);
//           `mapping` (optional) — JSON {column → channel name | "ignore"} for columns whose names
//           are not channel names of the network.
//   → 201 { recording, analysis: null }      small files, ingested within the request
//   → 202 { recording, analysis }            large files: the ingest job runs; poll
//                                             GET /api/analyses/:id (or listen to SSE) for progress
//   → 400 BAD_FILE          the file breaks a rule; message "line 17: <reason>" names the first fault
//   → 400 UNMAPPED_COLUMNS  details: one entry per unknown column (path "mapping.<column>") and
//                           `knownChannels` lists the network's channel names to choose from
//   → 400 BAD_MAPPING       the mapping names a missing column or channel, or maps two columns to one
//   → 409 DUPLICATE         the same bytes (sha256) are already recording N
//   → 413 PAYLOAD_TOO_LARGE a file is over the upload limit
// GET /api/recordings?limit&offset         (view) → { recordings } newest first
// GET /api/recordings/:id                  (view) → { recording } with channels and quality
// GET /api/recordings/:id/samples?channel&from&to&maxPoints   (view)
//   → one channel between two times, min/max per bucket for plotting (times as epoch seconds)
// DELETE /api/recordings/:id               (runAnalysis) → { ok: true } (its samples and analyses go too)
// GET /api/analyses/:id                    (view) → { analysis } status, progress 0..1, error
import { z } from 'zod';
import { idParamsSchema, idSchema, isoDateTime, okSchema } from './common';
import type { EndpointDef } from './endpoints';
import { analysisResponseSchema } from './scans';

export const RECORDING_FORMATS = ['csv', 'comtrade-ascii', 'comtrade-binary'] as const;
export const RECORDING_STATUSES = ['uploaded', 'ingesting', 'ready', 'failed'] as const;

/** Multipart field names of the upload. */
export const UPLOAD_FILE_FIELD = 'file';
export const UPLOAD_MAPPING_FIELD = 'mapping';
/** Mapping target that leaves a column out. */
export const MAPPING_IGNORE = 'ignore';

/** The `mapping` field: {column name → channel name or "ignore"}, sent as a JSON string. */
export const uploadMappingSchema = z.record(
  z.string().min(1, { error: 'A mapped column name must not be empty' }).max(200, { error: 'Column names are at most 200 characters' }),
  z
    .string({ error: 'Map each column to a channel name or "ignore"' })
    .min(1, { error: 'Map each column to a channel name or "ignore"' })
    .max(100, { error: 'Channel names are at most 100 characters' }),
  { error: 'mapping must be an object {column: channel name or "ignore"}' },
);
export type UploadMapping = z.infer<typeof uploadMappingSchema>;

/** The text fields of the multipart upload (files travel as parts named `file`). */
export const uploadFieldsSchema = z
  .object({
    mapping: z
      .string({ error: 'mapping must be a JSON text' })
      .max(100_000, { error: 'mapping is too long' })
      .transform((text, ctx) => {
        try {
          return JSON.parse(text) as unknown;
        } catch {
          ctx.addIssue({ code: 'custom', message: 'mapping is not valid JSON' });
          return z.NEVER;
        }
      })
      .pipe(uploadMappingSchema)
      .optional(),
  })
  .strict();
export type UploadFields = z.input<typeof uploadFieldsSchema>;

/** Data-quality counts of one channel over the whole recording (same meaning as a window's). */
export const channelQualitySchema = z.object({
  /** Frame slots from the first to the last row. */
  samples: z.number().int(),
  /** Missing samples: empty cells and the samples of missing frames. */
  dropouts: z.number().int(),
  /** Runs of missing samples, and the longest run in samples. */
  gaps: z.number().int(),
  longestGap: z.number().int(),
  /** Samples in runs of identical values lasting ≥ 1 s (a frozen PMU output). */
  flatLine: z.number().int(),
  /** Samples > 6 robust standard deviations from their chunk's median. */
  outliers: z.number().int(),
  /** Rows repeated verbatim in the file (dropped). */
  duplicates: z.number().int(),
});
export type ChannelQuality = z.infer<typeof channelQualitySchema>;

/** Whole-file counts. */
export const recordingQualitySchema = z.object({
  /** Rows kept. */
  rows: z.number().int(),
  duplicates: z.number().int(),
  /** Jumps in time (runs of missing frames) and the frames they miss. */
  gaps: z.number().int(),
  missingFrames: z.number().int(),
  /** Exact epoch seconds of the first frame (startTime is rounded to milliseconds). */
  startEpoch: z.number(),
});
export type RecordingQuality = z.infer<typeof recordingQualitySchema>;

export const recordingSummarySchema = z.object({
  id: z.number().int(),
  fileName: z.string(),
  /** sha256 of the uploaded bytes, hex (a .cfg/.dat pair: sha256 of the two files' digests). */
  checksum: z.string(),
  format: z.enum(RECORDING_FORMATS),
  sizeBytes: z.number().int().nullable(),
  startTime: isoDateTime.nullable(),
  endTime: isoDateTime.nullable(),
  /** Reporting rate, frames/s. */
  rate: z.number().nullable(),
  channelCount: z.number().int().nullable(),
  /** Frame slots per channel (rows + missing frames). */
  sampleCount: z.number().int().nullable(),
  status: z.enum(RECORDING_STATUSES),
  uploadedBy: z.object({ id: z.number().int(), displayName: z.string() }).nullable(),
  uploadedAt: isoDateTime,
  /** Why the ingest failed (status 'failed'). */
  error: z.string().nullable(),
  quality: recordingQualitySchema.nullable(),
});
export type RecordingSummary = z.infer<typeof recordingSummarySchema>;

export const recordingChannelSchema = z.object({
  channelId: z.number().int(),
  name: z.string(),
  kind: z.string(),
  unit: z.string(),
  /** Column name (or COMTRADE channel id) in the file. */
  sourceName: z.string(),
  quality: channelQualitySchema.nullable(),
});
export type RecordingChannel = z.infer<typeof recordingChannelSchema>;

export const recordingDetailSchema = recordingSummarySchema.extend({ channels: z.array(recordingChannelSchema) });
export type RecordingDetail = z.infer<typeof recordingDetailSchema>;

export const recordingResponseSchema = z.object({ recording: recordingDetailSchema });
export type RecordingResponse = z.infer<typeof recordingResponseSchema>;

export const recordingListQuerySchema = z
  .object({
    limit: z.coerce
      .number({ error: 'limit must be a number' })
      .int({ error: 'limit must be a whole number' })
      .min(1, { error: 'limit must be at least 1' })
      .max(500, { error: 'limit must be at most 500' })
      .default(100),
    offset: z.coerce
      .number({ error: 'offset must be a number' })
      .int({ error: 'offset must be a whole number' })
      .min(0, { error: 'offset must not be negative' })
      .default(0),
  })
  .strict();
export type RecordingListQuery = z.input<typeof recordingListQuerySchema>;

export const recordingListResponseSchema = z.object({ recordings: z.array(recordingSummarySchema) });
export type RecordingListResponse = z.infer<typeof recordingListResponseSchema>;

/** What an upload answers: the recording, and the ingest analysis when the job does the work (202). */
export const uploadResponseSchema = z.object({
  recording: recordingDetailSchema,
  analysis: z
    .object({
      id: z.number().int(),
      status: z.enum(['queued', 'running', 'done', 'failed']),
      progress: z.number(),
    })
    .nullable(),
});
export type UploadResponse = z.infer<typeof uploadResponseSchema>;

/** Details of a 400 UNMAPPED_COLUMNS answer beyond `details`: the channels to choose from. */
export const unmappedColumnsSchema = z.object({
  columns: z.array(z.string()),
  knownChannels: z.array(z.string()),
});

/** A time given as epoch seconds ("1735689600.5") or ISO-8601 with a zone; → epoch seconds. */
const timeParam = (what: string) =>
  z
    .string({ error: `${what} must be a time` })
    .trim()
    .transform((s, ctx) => {
      if (/^[+-]?\d+(\.\d+)?$/.test(s)) return Number(s);
      const ok = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/.test(s);
      const ms = ok ? Date.parse(s) : NaN;
      if (Number.isNaN(ms)) {
        ctx.addIssue({ code: 'custom', message: `${what} must be epoch seconds or an ISO-8601 time with a zone` });
        return z.NEVER;
      }
      return ms / 1000;
    });

export const samplesQuerySchema = z
  .object({
    /** Channel name (e.g. moorgate.angle). */
    channel: z.string({ error: 'channel is required' }).trim().min(1, { error: 'channel is required' }).max(100),
    from: timeParam('from').optional(),
    to: timeParam('to').optional(),
    maxPoints: z.coerce
      .number({ error: 'maxPoints must be a number' })
      .int({ error: 'maxPoints must be a whole number' })
      .min(10, { error: 'maxPoints must be at least 10' })
      .max(20_000, { error: 'maxPoints must be at most 20000' })
      .default(2000),
  })
  .strict()
  .refine((q) => q.from === undefined || q.to === undefined || q.from < q.to, { error: 'from must be before to', path: ['to'] });
export type SamplesQuery = z.input<typeof samplesQuerySchema>;

export const samplesResponseSchema = z.object({
  recordingId: z.number().int(),
  channel: z.string(),
  unit: z.string(),
  /** Frames/s of the stored data. */
  rate: z.number(),
  /** Epoch seconds of the first and last sample returned. */
  from: z.number(),
  to: z.number(),
  /** Samples per bucket (1: every sample, min = max) and its length in seconds. */
  bucketSamples: z.number().int(),
  bucketSeconds: z.number(),
  /** Per bucket: epoch seconds of its first sample, smallest and largest finite value (null: no data). */
  t: z.array(z.number()),
  min: z.array(z.number().nullable()),
  max: z.array(z.number().nullable()),
});
export type SamplesResponse = z.infer<typeof samplesResponseSchema>;

export const recordingIdParamsSchema = z.object({ id: idSchema });

// ---------------------------------------------------------------- catalogue entries
// Spread into ENDPOINTS (./endpoints.ts). The upload declares no `body`: it is multipart, read
// by the handler (spooled to disk while it arrives) and checked with uploadFieldsSchema there.

const e = <T extends EndpointDef>(d: T) => d;

export const RECORDING_ENDPOINTS = {
  'recordings.list': e({ method: 'GET', path: '/api/recordings', access: 'view', status: 200, summary: 'Recordings, newest first', query: recordingListQuerySchema, response: recordingListResponseSchema }),
  'recordings.upload': e({ method: 'POST', path: '/api/recordings', access: 'runAnalysis', status: 201, summary: 'Upload a recording (multipart: file, mapping); 201 when stored, 202 with the ingest analysis for large files', response: uploadResponseSchema }),
  'recordings.get': e({ method: 'GET', path: '/api/recordings/:id', access: 'view', status: 200, summary: 'A recording with its channels and data quality', params: recordingIdParamsSchema, response: recordingResponseSchema }),
  'recordings.samples': e({ method: 'GET', path: '/api/recordings/:id/samples', access: 'view', status: 200, summary: "One channel's samples between two times, min/max per bucket", params: recordingIdParamsSchema, query: samplesQuerySchema, response: samplesResponseSchema }),
  'recordings.remove': e({ method: 'DELETE', path: '/api/recordings/:id', access: 'runAnalysis', status: 200, summary: 'Delete a recording with its samples and analyses', params: recordingIdParamsSchema, response: okSchema }),
  'analyses.get': e({ method: 'GET', path: '/api/analyses/:id', access: 'view', status: 200, summary: 'One analysis (ingest, scan or fit): status, progress 0..1, error', params: idParamsSchema, response: analysisResponseSchema }),
} as const satisfies Record<string, EndpointDef>;
