// Recordings, their channels and their samples. Samples are stored per channel in chunks of
// consecutive frames: `count` little-endian float64 (dtype f64) or float32 (f32) values, NaN for
// a missing sample; chunk k of a recording starts at frame slot k · chunkSize (chunkSize and the
// exact start time, to the microsecond, are in the recording's quality record). A chunk whose
// samples are all missing is not stored; readers fill NaN for it.
import { and, asc, desc, eq, gte, inArray, lte } from 'drizzle-orm';
import os from 'node:os';
import type { SampledRecord } from '../../modal/types';
import type { DbOrTx } from '../client';
import { channels, people, recordingChannels, recordings, sampleChunks } from '../schema';

export type RecordingRow = typeof recordings.$inferSelect;
export type RecordingFormat = RecordingRow['format'];
export type SampleDtype = (typeof sampleChunks.$inferSelect)['dtype'];

if (os.endianness() !== 'LE') {
  // Chunks are written straight from Float64Array memory; a big-endian host would need swaps.
  throw new Error('Keel stores samples as little-endian floats and must run on a little-endian machine');
}

/** The file-level summary kept in recordings.quality (see shared/api/recordings.ts). */
export interface StoredRecordingQuality {
  rows: number;
  duplicates: number;
  gaps: number;
  missingFrames: number;
  /** Exact epoch seconds of frame 0 (recordings.start_time is a JS Date, so milliseconds). */
  startEpoch: number;
  /** Frames per stored chunk. */
  chunkSize: number;
}

export function encodeSamples(values: Float64Array, dtype: SampleDtype = 'f64'): Buffer {
  const arr = dtype === 'f64' ? values : Float32Array.from(values);
  return Buffer.from(arr.buffer, arr.byteOffset, arr.byteLength);
}

export function decodeSamples(bytes: Buffer, dtype: SampleDtype, count: number): Float64Array {
  const width = dtype === 'f64' ? 8 : 4;
  if (bytes.length !== count * width) {
    throw new Error(`sample chunk holds ${bytes.length} bytes, expected ${count} × ${width}`);
  }
  // Copy into an aligned buffer: pg's Buffers may start at any byte offset.
  const copy = new Uint8Array(bytes.length);
  copy.set(bytes);
  return dtype === 'f64' ? new Float64Array(copy.buffer) : Float64Array.from(new Float32Array(copy.buffer));
}

export async function findRecordingByChecksum(
  db: DbOrTx,
  params: { checksum: string },
): Promise<Pick<RecordingRow, 'id' | 'fileName' | 'status'> | undefined> {
  const [row] = await db
    .select({ id: recordings.id, fileName: recordings.fileName, status: recordings.status })
    .from(recordings)
    .where(eq(recordings.checksum, params.checksum));
  return row;
}

export async function createRecording(
  db: DbOrTx,
  params: {
    fileName: string;
    checksum: string;
    format: RecordingFormat;
    sizeBytes: number;
    uploadedBy: number | null;
    status: 'uploaded' | 'ingesting';
  },
): Promise<RecordingRow> {
  const [row] = await db.insert(recordings).values(params).returning();
  return row;
}

export interface ChunkInsert {
  channelId: number;
  chunkIndex: number;
  /** Epoch seconds of the chunk's first sample. */
  startTime: number;
  values: Float64Array;
}

/** One multi-row INSERT per call; callers batch (the ingest writes a few MB at a time). */
export async function insertSampleChunks(
  db: DbOrTx,
  params: { recordingId: number; chunks: ChunkInsert[]; dtype?: SampleDtype },
): Promise<void> {
  if (params.chunks.length === 0) return;
  const dtype = params.dtype ?? 'f64';
  // pg allows 65535 parameters per statement; 7 per row.
  const BATCH = 5000;
  for (let i = 0; i < params.chunks.length; i += BATCH) {
    await db.insert(sampleChunks).values(
      params.chunks.slice(i, i + BATCH).map((c) => ({
        recordingId: params.recordingId,
        channelId: c.channelId,
        chunkIndex: c.chunkIndex,
        startTime: new Date(c.startTime * 1000),
        count: c.values.length,
        dtype,
        values: encodeSamples(c.values, dtype),
      })),
    );
  }
}

export interface RecordingChannelInsert {
  channelId: number;
  sourceName: string;
  columnIndex: number;
  quality: Record<string, unknown>;
}

/** Marks an ingested recording ready, with its span, rate, counts, quality and channels. */
export async function completeRecording(
  db: DbOrTx,
  params: {
    id: number;
    startEpoch: number;
    endEpoch: number;
    rate: number;
    sampleCount: number;
    quality: StoredRecordingQuality;
    channels: RecordingChannelInsert[];
  },
): Promise<void> {
  await db.insert(recordingChannels).values(params.channels.map((c) => ({ ...c, recordingId: params.id })));
  await db
    .update(recordings)
    .set({
      status: 'ready',
      error: null,
      startTime: new Date(params.startEpoch * 1000),
      endTime: new Date(params.endEpoch * 1000),
      rate: params.rate,
      channelCount: params.channels.length,
      sampleCount: params.sampleCount,
      quality: params.quality as unknown as Record<string, unknown>,
    })
    .where(eq(recordings.id, params.id));
}

export async function setRecordingStatus(
  db: DbOrTx,
  params: { id: number; status: RecordingRow['status']; error?: string | null },
): Promise<void> {
  await db
    .update(recordings)
    .set({ status: params.status, error: params.error ?? null })
    .where(eq(recordings.id, params.id));
}

export async function deleteRecording(db: DbOrTx, params: { id: number }): Promise<boolean> {
  return (await db.delete(recordings).where(eq(recordings.id, params.id)).returning({ id: recordings.id })).length > 0;
}

export interface RecordingWithUploader extends RecordingRow {
  uploaderName: string | null;
}

const withUploader = {
  recording: recordings,
  uploaderName: people.displayName,
};

export async function listRecordings(
  db: DbOrTx,
  params: { limit?: number; offset?: number } = {},
): Promise<RecordingWithUploader[]> {
  const rows = await db
    .select(withUploader)
    .from(recordings)
    .leftJoin(people, eq(people.id, recordings.uploadedBy))
    .orderBy(desc(recordings.uploadedAt), desc(recordings.id))
    .limit(params.limit ?? 100)
    .offset(params.offset ?? 0);
  return rows.map((r) => ({ ...r.recording, uploaderName: r.uploaderName }));
}

export async function getRecording(db: DbOrTx, params: { id: number }): Promise<RecordingWithUploader | undefined> {
  const [r] = await db
    .select(withUploader)
    .from(recordings)
    .leftJoin(people, eq(people.id, recordings.uploadedBy))
    .where(eq(recordings.id, params.id));
  return r ? { ...r.recording, uploaderName: r.uploaderName } : undefined;
}

export interface RecordingChannelInfo {
  channelId: number;
  name: string;
  kind: string;
  unit: string;
  sourceName: string;
  columnIndex: number;
  quality: Record<string, unknown> | null;
}

export async function listRecordingChannels(db: DbOrTx, params: { recordingId: number }): Promise<RecordingChannelInfo[]> {
  return db
    .select({
      channelId: recordingChannels.channelId,
      name: channels.name,
      kind: channels.kind,
      unit: channels.unit,
      sourceName: recordingChannels.sourceName,
      columnIndex: recordingChannels.columnIndex,
      quality: recordingChannels.quality,
    })
    .from(recordingChannels)
    .innerJoin(channels, eq(channels.id, recordingChannels.channelId))
    .where(eq(recordingChannels.recordingId, params.recordingId))
    .orderBy(asc(recordingChannels.columnIndex));
}

/** The network's channels by name, for mapping uploaded columns. */
export async function listChannelNames(db: DbOrTx): Promise<{ id: number; name: string; unit: string }[]> {
  return db.select({ id: channels.id, name: channels.name, unit: channels.unit }).from(channels).orderBy(asc(channels.name));
}

export class RecordingSamplesError extends Error {
  readonly code = 'RECORDING_SAMPLES' as const;
  constructor(message: string) {
    super(message);
    this.name = 'RecordingSamplesError';
  }
}

/** Exact start (epoch s) and chunk size of a ready recording. */
function layoutOf(rec: RecordingRow): { start: number; rate: number; frames: number; chunkSize: number } {
  const q = rec.quality as Partial<StoredRecordingQuality> | null;
  if (rec.status !== 'ready' || rec.rate === null || rec.sampleCount === null || rec.startTime === null || !q?.chunkSize) {
    throw new RecordingSamplesError(`Recording ${rec.id} is not ready (status ${rec.status})`);
  }
  return {
    start: typeof q.startEpoch === 'number' ? q.startEpoch : rec.startTime.getTime() / 1000,
    rate: rec.rate,
    frames: rec.sampleCount,
    chunkSize: q.chunkSize,
  };
}

const epochOf = (t: Date | number | undefined): number | undefined =>
  t === undefined ? undefined : t instanceof Date ? t.getTime() / 1000 : t;

/**
 * Reassembles a ready recording's samples as a SampledRecord (modal/types.ts) for the scan and
 * fit jobs: the named channels (default: all, in file column order) over [from, to] (Dates or
 * epoch seconds; default the whole recording; both ends inclusive, clipped to the recording).
 * Missing samples are NaN; an interval holding no frame gives empty arrays. Throws
 * RecordingSamplesError when the recording does not exist or is not ready, or a channel is not in it.
 */
export async function readRecordingSamples(
  db: DbOrTx,
  params: { recordingId: number; channels?: string[]; from?: Date | number; to?: Date | number },
): Promise<SampledRecord> {
  const [rec] = await db.select().from(recordings).where(eq(recordings.id, params.recordingId));
  if (!rec) throw new RecordingSamplesError(`Recording ${params.recordingId} does not exist`);
  const { start, rate, frames, chunkSize } = layoutOf(rec);
  const available = await listRecordingChannels(db, { recordingId: rec.id });
  let wanted = available;
  if (params.channels) {
    wanted = params.channels.map((name) => {
      const c = available.find((a) => a.name === name);
      if (!c) {
        throw new RecordingSamplesError(
          `Recording ${rec.id} has no channel "${name}" (it has: ${available.map((a) => a.name).join(', ')})`,
        );
      }
      return c;
    });
  }
  // Frame slots s with start + s/rate in [from, to]; a millionth of a frame absorbs rounding.
  const eps = 1e-6;
  const from = epochOf(params.from);
  const to = epochOf(params.to);
  const s0 = from === undefined ? 0 : Math.max(0, Math.ceil((from - start) * rate - eps));
  const s1 = to === undefined ? frames - 1 : Math.min(frames - 1, Math.floor((to - start) * rate + eps));
  const n = Math.max(0, s1 - s0 + 1);
  const out = wanted.map((c) => ({ name: c.name, values: new Float64Array(n).fill(NaN) }));
  if (wanted.length > 0 && n > 0) {
    const byChannel = new Map(wanted.map((c, i) => [c.channelId, out[i].values]));
    const rows = await db
      .select({ channelId: sampleChunks.channelId, chunkIndex: sampleChunks.chunkIndex, count: sampleChunks.count, dtype: sampleChunks.dtype, values: sampleChunks.values })
      .from(sampleChunks)
      .where(
        and(
          eq(sampleChunks.recordingId, rec.id),
          inArray(
            sampleChunks.channelId,
            wanted.map((c) => c.channelId),
          ),
          gte(sampleChunks.chunkIndex, Math.floor(s0 / chunkSize)),
          lte(sampleChunks.chunkIndex, Math.floor(s1 / chunkSize)),
        ),
      );
    for (const r of rows) {
      const dest = byChannel.get(r.channelId)!;
      const vals = decodeSamples(r.values, r.dtype, r.count);
      const first = r.chunkIndex * chunkSize; // slot of vals[0]
      const a = Math.max(s0, first);
      const b = Math.min(s1, first + vals.length - 1);
      if (b >= a) dest.set(vals.subarray(a - first, b - first + 1), a - s0);
    }
  }
  return { startTime: start + s0 / rate, rate, channels: out };
}
