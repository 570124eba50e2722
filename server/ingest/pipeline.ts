// The ingest pipeline without storage: source rows → row checks and grid alignment → chunks per
// channel + quality. The caller supplies where chunks go (a database transaction, or memory in
// tests) and gets a summary to store with the recording. Rows stream through: memory holds one
// chunk per channel, the chunks waiting to be written, and the reader's buffers.
import { FrameAligner } from './aligner';
import { ChunkWriter, DEFAULT_CHUNK_SIZE, type SampleChunk } from './chunker';
import { mapColumns, type ColumnMapping, type NetworkChannel } from './mapping';
import type { ChannelQuality } from './quality';
import type { IngestSource, SourceFormat } from './source';

export interface IngestSink {
  /** Stores finished chunks; awaited before more rows are read (back-pressure). */
  writeChunks(chunks: SampleChunk[]): Promise<void>;
}

export interface IngestOptions {
  /** 50 or 60 Hz: only that system's reporting rates are standard (default: the file's lf, else either). */
  nominalHz?: number;
  chunkSize?: number;
  maxGapSeconds?: number;
  /** Write chunks once this many bytes of them are waiting (default 4 MiB). */
  batchBytes?: number;
  /** Called with the fraction of the file read, 0..1, at most every `progressEvery` bytes. */
  onProgress?: (fraction: number) => void | Promise<void>;
  progressEvery?: number;
}

export interface ChannelSummary {
  channel: NetworkChannel;
  columnName: string;
  unit?: string;
  quality: ChannelQuality;
}

export interface IngestSummary {
  format: SourceFormat;
  /** Epoch seconds of the first and last frame slot. */
  startTime: number;
  endTime: number;
  /** Standard reporting rate, frames/s. */
  rate: number;
  /** Frame slots from first to last (rows kept + missing frames). */
  frames: number;
  /** Rows kept (after dropping verbatim duplicates). */
  rows: number;
  duplicates: number;
  /** Jumps in time (runs of missing frames) and the frames they miss. */
  gaps: number;
  missingFrames: number;
  chunkSize: number;
  chunks: number;
  channels: ChannelSummary[];
}

/** Maps the source's columns (throws UNMAPPED_COLUMNS / BAD_MAPPING) — before anything is stored. */
export function planColumns(
  source: IngestSource,
  channels: NetworkChannel[],
  mapping?: Record<string, string>,
): ColumnMapping[] {
  return mapColumns(source.columns, channels, mapping, source.headerWhere);
}

export async function runIngest(
  source: IngestSource,
  plan: ColumnMapping[],
  sink: IngestSink,
  opts: IngestOptions = {},
): Promise<IngestSummary> {
  const chunkSize = opts.chunkSize ?? DEFAULT_CHUNK_SIZE;
  const batchBytes = opts.batchBytes ?? 4 << 20;
  const progressEvery = opts.progressEvery ?? 1 << 20;
  const writer = new ChunkWriter(plan.length, chunkSize);
  const aligner = new FrameAligner(
    {
      declaredRate: source.declaredRate,
      nominalHz: opts.nominalHz ?? source.nominalHz,
      maxGapSeconds: opts.maxGapSeconds,
      where: source.where,
    },
    writer,
  );
  let chunks = 0;
  const flush = async () => {
    const ready = writer.take();
    if (ready.length === 0) return;
    chunks += ready.length;
    await sink.writeChunks(ready);
  };
  let nextProgress = progressEvery;
  try {
    for await (const row of source.rows(plan.map((p) => p.column))) {
      aligner.push(row);
      if (writer.readyBytes >= batchBytes) await flush();
      if (opts.onProgress && source.bytesRead() >= nextProgress) {
        nextProgress = source.bytesRead() + progressEvery;
        await opts.onProgress(Math.min(1, source.bytesRead() / source.totalBytes));
      }
    }
    aligner.finish();
    writer.end();
    await flush();
    if (opts.onProgress) await opts.onProgress(1);
  } finally {
    source.close();
  }
  const qualities = writer.qualities(aligner.duplicates);
  return {
    format: source.format,
    startTime: aligner.startTime!,
    endTime: aligner.endTime,
    rate: aligner.rate!,
    frames: writer.frames,
    rows: aligner.rows,
    duplicates: aligner.duplicates,
    gaps: aligner.gaps,
    missingFrames: aligner.missingFrames,
    chunkSize,
    chunks,
    channels: plan.map((p, i) => ({
      channel: p.channel,
      columnName: p.columnName,
      unit: source.columns[p.column].unit,
      quality: qualities[i],
    })),
  };
}
