// Upload and ingest settings, from the environment (read by the server and the worker alike,
// which must see the same spool folder: run the ingest worker on the machine that receives the
// uploads, or put KEEL_SPOOL_DIR on a shared volume).
import os from 'node:os';
import path from 'node:path';
import { z } from 'zod';

const bytes = (fallback: number) =>
  z.coerce
    .number({ error: 'must be a number of bytes' })
    .int({ error: 'must be a whole number of bytes' })
    .nonnegative({ error: 'must not be negative' })
    .default(fallback);

const schema = z.object({
  KEEL_SPOOL_DIR: z.string().min(1).default(path.join(os.tmpdir(), 'keel-spool')),
  /** Largest file of an upload (413 above it). Default 512 MiB: a day of 30 frames/s × 20 channels is ~350 MB of CSV. */
  KEEL_UPLOAD_MAX_BYTES: bytes(512 * 1024 * 1024),
  /** Uploads up to this size are ingested within the request (201); larger ones by the ingest job (202). */
  KEEL_INGEST_SYNC_MAX_BYTES: bytes(4 * 1024 * 1024),
  /** Longest gap in a file kept as missing samples, seconds. */
  KEEL_INGEST_MAX_GAP_S: z.coerce.number().positive().default(600),
});

export type IngestSettings = {
  spoolDir: string;
  uploadMaxBytes: number;
  syncMaxBytes: number;
  maxGapSeconds: number;
};

export function ingestSettings(env: Record<string, string | undefined> = process.env): IngestSettings {
  const parsed = schema.safeParse(env);
  if (!parsed.success) {
    const msg = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new Error(`Invalid ingest settings: ${msg}`);
  }
  const e = parsed.data;
  return {
    spoolDir: path.resolve(e.KEEL_SPOOL_DIR),
    uploadMaxBytes: e.KEEL_UPLOAD_MAX_BYTES,
    syncMaxBytes: e.KEEL_INGEST_SYNC_MAX_BYTES,
    maxGapSeconds: e.KEEL_INGEST_MAX_GAP_S,
  };
}
