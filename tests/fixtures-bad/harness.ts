// Runs the ingest pipeline on files written to a temporary folder, keeping the chunks in memory
// (no database), and reassembles each channel — the parser-level tests use it.
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { TARROW_CHANNELS } from '../../fixtures/tarrow-network';
import type { SampleChunk } from '../../server/ingest/chunker';
import type { NetworkChannel } from '../../server/ingest/mapping';
import { openUpload, type UploadedFile } from '../../server/ingest/open';
import { planColumns, runIngest, type IngestOptions, type IngestSummary } from '../../server/ingest/pipeline';

export const TEST_CHANNELS: NetworkChannel[] = TARROW_CHANNELS.map((c, i) => ({ id: i + 1, name: c.name }));

export interface FileSpec {
  name: string;
  content: string | Buffer;
}

export function makeTmpDir(tag = 'keel-ingest-'): string {
  return fs.mkdtempSync(path.join(os.tmpdir(), tag));
}

/** Writes each file under a neutral name (like the spool does) and describes it as uploaded. */
export function writeUpload(dir: string, files: FileSpec[]): UploadedFile[] {
  return files.map((f, i) => {
    const p = path.join(dir, `${crypto.randomBytes(6).toString('hex')}-${i}.part`);
    const buf = typeof f.content === 'string' ? Buffer.from(f.content) : f.content;
    fs.writeFileSync(p, buf);
    return { originalName: f.name, path: p, size: buf.length, sha256: crypto.createHash('sha256').update(buf).digest('hex') };
  });
}

export interface MemoryIngest {
  summary: IngestSummary;
  chunks: SampleChunk[];
  /** Channel name → all frames, NaN where nothing was stored. */
  series: Record<string, Float64Array>;
}

export async function ingestToMemory(
  upload: UploadedFile[],
  opts: IngestOptions & { mapping?: Record<string, string>; channels?: NetworkChannel[] } = {},
): Promise<MemoryIngest> {
  const { source } = await openUpload(upload);
  let plan;
  try {
    plan = planColumns(source, opts.channels ?? TEST_CHANNELS, opts.mapping);
  } catch (err) {
    source.close();
    throw err;
  }
  const chunks: SampleChunk[] = [];
  const summary = await runIngest(source, plan, { writeChunks: async (c) => void chunks.push(...c) }, opts);
  const series: Record<string, Float64Array> = {};
  summary.channels.forEach((ch, i) => {
    const all = new Float64Array(summary.frames).fill(NaN);
    for (const c of chunks) if (c.channel === i) all.set(c.values, c.startSlot);
    series[ch.channel.name] = all;
  });
  return { summary, chunks, series };
}

/** The error an ingest of these files is refused with (fails the test when there is none). */
export async function refusal(
  dir: string,
  files: FileSpec[],
  opts: { mapping?: Record<string, string> } = {},
): Promise<{ code: string; message: string }> {
  try {
    await ingestToMemory(writeUpload(dir, files), opts);
  } catch (err) {
    const e = err as { code?: string; message: string };
    return { code: e.code ?? 'none', message: e.message };
  }
  throw new Error(`expected a refusal of ${files.map((f) => f.name).join(' + ')}, but the ingest succeeded`);
}
