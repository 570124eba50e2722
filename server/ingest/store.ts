// The ingest with storage: check an upload (file type, duplicate, columns) before anything is
// written, then stream it into a recording inside the caller's transaction — the recording's
// chunks, its channels with their quality, and its span, rate and counts all commit together or
// not at all. Used by the upload route (small files) and the ingest job (large ones).
import crypto from 'node:crypto';
import type { DbOrTx } from '../../db/client';
import {
  completeRecording,
  findRecordingByChecksum,
  insertSampleChunks,
  listChannelNames,
  type RecordingFormat,
} from '../../db/queries/recordings';
import { DuplicateRecordingError } from './errors';
import type { ColumnMapping } from './mapping';
import { classifyUpload, openUpload, type UploadedFile } from './open';
import { planColumns, runIngest, type IngestSummary } from './pipeline';
import type { IngestSource } from './source';

/**
 * sha256 identifying an upload: the file's own digest; for a .cfg/.dat pair, the digest of the
 * two files' hex digests (cfg then dat), so that the pair is one recording.
 */
export function uploadChecksum(files: UploadedFile[]): string {
  const { files: ordered } = classifyUpload(files);
  if (ordered.length === 1) return ordered[0].sha256;
  return crypto
    .createHash('sha256')
    .update(ordered.map((f) => f.sha256).join(''))
    .digest('hex');
}

/** The name a recording is listed under: the file's, or the .cfg's for a pair. */
export function uploadName(files: UploadedFile[]): string {
  return classifyUpload(files).files[0].originalName;
}

export interface PreparedUpload {
  source: IngestSource;
  plan: ColumnMapping[];
  checksum: string;
  fileName: string;
  sizeBytes: number;
  format: RecordingFormat;
  /** A failed earlier upload of the same bytes, to be replaced (deleted in the ingest transaction). */
  replaces: number | null;
}

/**
 * Checks an upload without storing anything: accepted file shapes, not a duplicate of a stored
 * recording (unless `ownRecordingId` is that recording: the job re-reading its own upload),
 * readable header, every column mapped. The caller must either ingest or close `source`.
 */
export async function prepareUpload(
  db: DbOrTx,
  params: { files: UploadedFile[]; mapping?: Record<string, string>; ownRecordingId?: number },
): Promise<PreparedUpload> {
  const checksum = uploadChecksum(params.files);
  const fileName = uploadName(params.files);
  let replaces: number | null = null;
  const existing = await findRecordingByChecksum(db, { checksum });
  if (existing && existing.id !== params.ownRecordingId) {
    if (existing.status !== 'failed') throw new DuplicateRecordingError(existing, checksum);
    replaces = existing.id;
  }
  const { source } = await openUpload(params.files);
  try {
    const channels = await listChannelNames(db);
    const plan = planColumns(source, channels, params.mapping);
    return {
      source,
      plan,
      checksum,
      fileName,
      sizeBytes: params.files.reduce((s, f) => s + f.size, 0),
      format: source.recordFormat,
      replaces,
    };
  } catch (err) {
    source.close();
    throw err;
  }
}

export interface StoreOptions {
  chunkSize?: number;
  maxGapSeconds?: number;
  onProgress?: (fraction: number) => void | Promise<void>;
  progressEvery?: number;
}

/**
 * Streams a prepared upload into recording `recordingId` through `tx` (a transaction: a refusal
 * half-way throws, and the caller's rollback leaves nothing of the file behind).
 */
export async function storeUpload(
  tx: DbOrTx,
  params: { recordingId: number; prepared: PreparedUpload } & StoreOptions,
): Promise<IngestSummary> {
  const { prepared, recordingId } = params;
  const channelIds = prepared.plan.map((p) => p.channel.id);
  const summary = await runIngest(
    prepared.source,
    prepared.plan,
    {
      writeChunks: (chunks) =>
        insertSampleChunks(tx, {
          recordingId,
          chunks: chunks.map((c) => ({ channelId: channelIds[c.channel], chunkIndex: c.seq, startTime: c.startTime, values: c.values })),
        }),
    },
    {
      chunkSize: params.chunkSize,
      maxGapSeconds: params.maxGapSeconds,
      onProgress: params.onProgress,
      progressEvery: params.progressEvery,
    },
  );
  await completeRecording(tx, {
    id: recordingId,
    startEpoch: summary.startTime,
    endEpoch: summary.endTime,
    rate: summary.rate,
    sampleCount: summary.frames,
    quality: {
      rows: summary.rows,
      duplicates: summary.duplicates,
      gaps: summary.gaps,
      missingFrames: summary.missingFrames,
      startEpoch: summary.startTime,
      chunkSize: summary.chunkSize,
    },
    channels: summary.channels.map((c, i) => ({
      channelId: c.channel.id,
      sourceName: c.columnName,
      columnIndex: prepared.plan[i].column,
      quality: { ...c.quality },
    })),
  });
  return summary;
}

