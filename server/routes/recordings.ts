// Recordings: upload (spooled to disk as it arrives, checked, then stored in one transaction —
// within the request for small files, by the ingest job for large ones), list, detail, samples
// for plotting (min/max per bucket), delete. See shared/api/recordings.ts for the contract.
import type { Request, Response } from 'express';
import multer from 'multer';
import type { Queue } from 'bullmq';
import { recordAudit } from '../../db/queries/audit';
import {
  createRecording,
  deleteRecording,
  findRecordingByChecksum,
  getRecording,
  listRecordingChannels,
  listRecordings,
  readRecordingSamples,
  RecordingSamplesError,
  type RecordingWithUploader,
} from '../../db/queries/recordings';
import { createAnalysis, setAnalysisJob } from '../../db/queries/scans';
import { publishProgress } from '../../jobs/processors/analysis-progress';
import { createIngestQueue, enqueueIngest, type IngestJob } from '../../jobs/processors/ingest';
import type { ErrorDetail } from '../../shared/errors';
import {
  UPLOAD_FILE_FIELD,
  uploadFieldsSchema,
  type RecordingDetail,
  type RecordingQuality,
  type RecordingSummary,
  type ChannelQuality,
} from '../../shared/api/recordings';
import type { Deps } from '../deps';
import {
  AppError,
  ConflictError,
  NotFoundError,
  PayloadTooLargeError,
  pgErrorOf,
  UnavailableError,
  ValidationError,
  validationErrorFromZod,
} from '../errors';
import { liveBus } from '../events/live';
import { downsampleMinMax } from '../ingest/downsample';
import { DuplicateRecordingError, FileRefusedError, MappingError, UnmappedColumnsError } from '../ingest/errors';
import { cleanUploadName, type UploadedFile } from '../ingest/open';
import { ingestSettings, type IngestSettings } from '../ingest/settings';
import { removeSpooled, spoolStorage, sweepSpool } from '../ingest/spool';
import { prepareUpload, storeUpload } from '../ingest/store';
import { route, type RouteDef } from './registry';

// ---------------------------------------------------------------- errors of the upload

/** 400: the file breaks a rule; the message names the first offending line and the reason. */
export class BadFileError extends AppError {
  readonly code = 'BAD_FILE' as const;
}
/** 400: columns that match no channel; details list them and the channels to choose from. */
export class UnmappedColumnsHttpError extends AppError {
  readonly code = 'UNMAPPED_COLUMNS' as const;
}
/** 409: the same bytes are already a recording. */
export class DuplicateHttpError extends AppError {
  readonly code = 'DUPLICATE' as const;
}

/** Ingest refusals → the API's error classes (the status of each code is fixed in server/errors.ts). */
export function toHttpIngestError(err: unknown): unknown {
  if (err instanceof FileRefusedError) {
    return new BadFileError(err.message, [{ path: 'file', message: err.message }]);
  }
  if (err instanceof UnmappedColumnsError) {
    const details: ErrorDetail[] = [
      ...err.columns.map((c) => ({ path: `mapping.${c}`, message: 'Matches no channel: map it to a channel name or "ignore"' })),
      ...err.knownChannels.map((name) => ({ path: 'knownChannels', message: name })),
    ];
    return new UnmappedColumnsHttpError(err.message, details);
  }
  if (err instanceof MappingError) return new ValidationError(err.message, [{ path: 'mapping', message: err.message }]);
  if (err instanceof DuplicateRecordingError) {
    return new DuplicateHttpError(err.message, [{ path: 'recordingId', message: String(err.existing.id) }]);
  }
  return err;
}

// ---------------------------------------------------------------- receiving the upload

let cachedSettings: IngestSettings | null = null;
const settings = () => (cachedSettings ??= ingestSettings());

function mib(bytes: number): string {
  return `${Number((bytes / (1 << 20)).toFixed(1))} MiB`;
}

/** Spool files older than this are left-overs of a crash (or of a job queued far too long). */
const SPOOL_MAX_AGE_MS = 24 * 3600 * 1000;
let lastSweep = 0;

/** Runs multer on the request: every `file` part is spooled (server-chosen name, sha256, size). */
async function receiveUpload(req: Request, res: Response, deps: Deps): Promise<UploadedFile[]> {
  const s = settings();
  if (Date.now() - lastSweep > 3600 * 1000) {
    lastSweep = Date.now();
    void sweepSpool(s.spoolDir, SPOOL_MAX_AGE_MS).then(
      (n) => n > 0 && deps.log.info(`removed ${n} stale spool file(s) from ${s.spoolDir}`),
      () => undefined,
    );
  }
  if (!req.is('multipart/form-data')) {
    throw new ValidationError(`Send the recording as multipart/form-data with the file(s) in the field "${UPLOAD_FILE_FIELD}"`, [
      { path: UPLOAD_FILE_FIELD, message: 'Required' },
    ]);
  }
  const mw = multer({
    storage: spoolStorage(s.spoolDir),
    // Browsers send a quoted file name as UTF-8 (HTML standard), not Latin-1.
    defParamCharset: 'utf8',
    limits: { fileSize: s.uploadMaxBytes, files: 3, fields: 5, fieldSize: 200_000, parts: 10 },
  }).array(UPLOAD_FILE_FIELD, 3);
  await new Promise<void>((resolve, reject) => {
    mw(req, res, (err: unknown) => (err ? reject(err) : resolve()));
  }).catch((err: unknown) => {
    if (err instanceof multer.MulterError) {
      if (err.code === 'LIMIT_FILE_SIZE') throw new PayloadTooLargeError(`A file is larger than the upload limit of ${mib(s.uploadMaxBytes)}`);
      if (err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT') {
        throw new ValidationError(`Send one .csv, one .cff, or a .cfg and its .dat, in the field "${UPLOAD_FILE_FIELD}"`, [
          { path: err.field ?? UPLOAD_FILE_FIELD, message: err.code === 'LIMIT_FILE_COUNT' ? 'Too many files' : 'Unexpected file field' },
        ]);
      }
      throw new ValidationError(`The upload is malformed: ${err.message}`, [{ path: err.field ?? '', message: err.message }]);
    }
    throw new ValidationError(`The multipart body is malformed: ${(err as Error).message}`, [{ path: '', message: 'Malformed multipart body' }]);
  });
  const parts = (req.files as (Express.Multer.File & { sha256: string })[] | undefined) ?? [];
  // The client's name is only shown (messages, the list), never used as a path: cleaned for display.
  return parts.map((f) => ({ originalName: cleanUploadName(f.originalname), path: f.path, size: f.size, sha256: f.sha256 }));
}

// ---------------------------------------------------------------- answers

const iso = (d: Date) => d.toISOString();
const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null);

export function toRecordingSummary(r: RecordingWithUploader): RecordingSummary {
  const q = r.quality as (RecordingQuality & { chunkSize?: number }) | null;
  return {
    id: r.id,
    fileName: r.fileName,
    checksum: r.checksum,
    format: r.format,
    sizeBytes: r.sizeBytes,
    startTime: isoOrNull(r.startTime),
    endTime: isoOrNull(r.endTime),
    rate: r.rate,
    channelCount: r.channelCount,
    sampleCount: r.sampleCount,
    status: r.status,
    uploadedBy: r.uploadedBy !== null && r.uploaderName !== null ? { id: r.uploadedBy, displayName: r.uploaderName } : null,
    uploadedAt: iso(r.uploadedAt),
    error: r.error,
    quality: q
      ? { rows: q.rows, duplicates: q.duplicates, gaps: q.gaps, missingFrames: q.missingFrames, startEpoch: q.startEpoch }
      : null,
  };
}

async function recordingDetail(deps: Deps, id: number): Promise<RecordingDetail> {
  const r = await getRecording(deps.db, { id });
  if (!r) throw new NotFoundError(`No recording with id ${id}`);
  const channels = await listRecordingChannels(deps.db, { recordingId: id });
  return {
    ...toRecordingSummary(r),
    channels: channels.map((c) => ({
      channelId: c.channelId,
      name: c.name,
      kind: c.kind,
      unit: c.unit,
      sourceName: c.sourceName,
      quality: (c.quality as ChannelQuality | null) ?? null,
    })),
  };
}

// ---------------------------------------------------------------- the ingest queue of this server

const queues = new WeakMap<Deps, Queue<IngestJob>>();
function ingestQueue(deps: Deps): Queue<IngestJob> {
  let q = queues.get(deps);
  if (!q) {
    q = createIngestQueue(deps.redis, deps.config.queuePrefix);
    queues.set(deps, q);
  }
  return q;
}

/** A unique-checksum race (two uploads of the same bytes at once) reads as the duplicate it is. */
async function asDuplicate(deps: Deps, err: unknown, checksum: string): Promise<unknown> {
  const pg = pgErrorOf(err);
  if (pg?.code === '23505' && pg.constraint === 'recordings_checksum_unique') {
    const existing = await findRecordingByChecksum(deps.db, { checksum });
    if (existing) return new DuplicateRecordingError(existing, checksum);
  }
  return err;
}

// ---------------------------------------------------------------- routes

export function recordingRoutes(): RouteDef[] {
  return [
    route('recordings.list', async ({ deps, query }) => ({
      recordings: (await listRecordings(deps.db, { limit: query.limit, offset: query.offset })).map(toRecordingSummary),
    })),

    route('recordings.upload', async ({ req, res, deps, person, ip, setStatus }) => {
      const files = await receiveUpload(req, res, deps);
      let handedToJob = false;
      try {
        const fields = uploadFieldsSchema.safeParse(req.body ?? {});
        if (!fields.success) throw validationErrorFromZod(fields.error, req.body);
        const mapping = fields.data.mapping;
        const prepared = await prepareUpload(deps.db, { files, mapping });
        const s = settings();
        const base = {
          fileName: prepared.fileName,
          checksum: prepared.checksum,
          format: prepared.format,
          sizeBytes: prepared.sizeBytes,
          uploadedBy: person?.id ?? null,
        };
        const audit = (tx: Parameters<typeof recordAudit>[0], id: number, mode: string) =>
          recordAudit(tx, {
            personId: person?.id ?? null,
            action: 'recording.upload',
            target: `recording:${id}`,
            details: { fileName: prepared.fileName, sizeBytes: prepared.sizeBytes, checksum: prepared.checksum, mode },
            ip,
          });

        if (prepared.sizeBytes <= s.syncMaxBytes) {
          let id: number;
          try {
            id = await deps.db.transaction(async (tx) => {
              if (prepared.replaces !== null) await deleteRecording(tx, { id: prepared.replaces });
              const rec = await createRecording(tx, { ...base, status: 'ingesting' });
              await storeUpload(tx, { recordingId: rec.id, prepared, maxGapSeconds: s.maxGapSeconds });
              await audit(tx, rec.id, 'request');
              return rec.id;
            });
          } catch (err) {
            prepared.source.close();
            throw await asDuplicate(deps, err, prepared.checksum);
          }
          return { recording: await recordingDetail(deps, id), analysis: null };
        }

        // Large: the job parses and stores it; the spool files are now the job's.
        prepared.source.close();
        let created;
        try {
          created = await deps.db.transaction(async (tx) => {
            if (prepared.replaces !== null) await deleteRecording(tx, { id: prepared.replaces });
            const rec = await createRecording(tx, { ...base, status: 'ingesting' });
            const analysis = await createAnalysis(tx, {
              kind: 'ingest',
              recordingId: rec.id,
              method: prepared.format,
              settings: { files: files.map((f) => ({ name: f.originalName, size: f.size })), mapping: mapping ?? {} },
              createdBy: person?.id ?? null,
            });
            await audit(tx, rec.id, 'job');
            return { rec, analysis };
          });
        } catch (err) {
          throw await asDuplicate(deps, err, prepared.checksum);
        }
        try {
          const jobId = await enqueueIngest(ingestQueue(deps), {
            analysisId: created.analysis.id,
            recordingId: created.rec.id,
            files,
            ...(mapping ? { mapping } : {}),
          });
          handedToJob = true;
          await setAnalysisJob(deps.db, { id: created.analysis.id, jobId });
        } catch (err) {
          if (!handedToJob) {
            await deleteRecording(deps.db, { id: created.rec.id }).catch(() => undefined);
            deps.log.warn(`could not queue the ingest of ${prepared.fileName}: ${(err as Error).message}`);
            throw new UnavailableError('The job queue is unavailable; try the upload again shortly');
          }
          throw err;
        }
        await publishProgress({ events: liveBus(deps), log: deps.log }, created.analysis);
        setStatus(202);
        return {
          recording: await recordingDetail(deps, created.rec.id),
          analysis: { id: created.analysis.id, status: created.analysis.status, progress: created.analysis.progress },
        };
      } catch (err) {
        throw toHttpIngestError(err);
      } finally {
        if (!handedToJob) await removeSpooled(files.map((f) => f.path)).catch(() => undefined);
      }
    }),

    route('recordings.get', async ({ deps, params }) => ({ recording: await recordingDetail(deps, params.id) })),

    route('recordings.samples', async ({ deps, params, query }) => {
      const rec = await getRecording(deps.db, { id: params.id });
      if (!rec) throw new NotFoundError(`No recording with id ${params.id}`);
      if (rec.status !== 'ready') throw new ConflictError(`Recording ${rec.id} is not ready (status ${rec.status})`);
      const channels = await listRecordingChannels(deps.db, { recordingId: rec.id });
      const ch = channels.find((c) => c.name === query.channel);
      if (!ch) {
        throw new ValidationError(`Recording ${rec.id} has no channel "${query.channel}"`, [
          { path: 'channel', message: `One of: ${channels.map((c) => c.name).join(', ')}` },
        ]);
      }
      let record;
      try {
        record = await readRecordingSamples(deps.db, { recordingId: rec.id, channels: [ch.name], from: query.from, to: query.to });
      } catch (err) {
        if (err instanceof RecordingSamplesError) throw new ConflictError(err.message);
        throw err;
      }
      const values = record.channels[0].values;
      const d = downsampleMinMax(values, record.startTime, record.rate, query.maxPoints);
      return {
        recordingId: rec.id,
        channel: ch.name,
        unit: ch.unit,
        rate: record.rate,
        from: record.startTime,
        to: record.startTime + Math.max(0, values.length - 1) / record.rate,
        bucketSamples: d.bucketSamples,
        bucketSeconds: d.bucketSeconds,
        t: d.t,
        min: d.min,
        max: d.max,
      };
    }),

    route('recordings.remove', async ({ deps, params, person, ip }) => {
      const removed = await deps.db.transaction(async (tx) => {
        const rec = await getRecording(tx, { id: params.id });
        if (!rec) return null;
        await deleteRecording(tx, { id: rec.id });
        await recordAudit(tx, {
          personId: person?.id ?? null,
          action: 'recording.delete',
          target: `recording:${rec.id}`,
          details: { fileName: rec.fileName, checksum: rec.checksum },
          ip,
        });
        return rec;
      });
      if (!removed) throw new NotFoundError(`No recording with id ${params.id}`);
      return { ok: true as const };
    }),
  ];
}
