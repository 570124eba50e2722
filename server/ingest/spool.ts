// Spooling uploads to disk while they arrive: a multer storage engine that writes each file part
// to the spool folder under a random name chosen here (the client's file name never reaches the
// file system), hashing it (sha256) and counting its bytes on the way. The ingest reads the spool
// file afterwards — in the request for small files, in the ingest job for large ones — and
// deletes it when done.
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pipeline, Transform } from 'node:stream';
import type { Request } from 'express';
import type multer from 'multer';

export interface SpooledFile {
  path: string;
  size: number;
  sha256: string;
}

/** A fresh server-chosen path in the spool folder. */
export function spoolPath(dir: string): string {
  return path.join(dir, `${Date.now().toString(36)}-${crypto.randomBytes(12).toString('hex')}.part`);
}

export function spoolStorage(dir: string): multer.StorageEngine {
  return {
    _handleFile(_req: Request, file: Express.Multer.File, cb: (error?: unknown, info?: Partial<Express.Multer.File>) => void) {
      fs.mkdir(dir, { recursive: true, mode: 0o700 }, (mkErr) => {
        if (mkErr) return cb(mkErr);
        const target = spoolPath(dir);
        const hash = crypto.createHash('sha256');
        let size = 0;
        const tap = new Transform({
          transform(chunk: Buffer, _enc, done) {
            hash.update(chunk);
            size += chunk.length;
            done(null, chunk);
          },
        });
        const out = fs.createWriteStream(target, { flags: 'wx', mode: 0o600 });
        pipeline(file.stream, tap, out, (err) => {
          if (err) {
            fs.rm(target, { force: true }, () => cb(err));
            return;
          }
          const info: Partial<Express.Multer.File> & { sha256: string } = { path: target, size, sha256: hash.digest('hex') };
          cb(null, info);
        });
      });
    },
    _removeFile(_req: Request, file: Express.Multer.File, cb: (error: Error | null) => void) {
      if (!file.path) return cb(null);
      fs.rm(file.path, { force: true }, (err) => cb(err ?? null));
    },
  };
}

/** Deletes spool files, ignoring ones already gone. */
export async function removeSpooled(paths: string[]): Promise<void> {
  await Promise.all(paths.map((p) => fs.promises.rm(p, { force: true })));
}

/** Removes spool files older than `maxAgeMs` (left by a crash), so the folder cannot fill up. */
export async function sweepSpool(dir: string, maxAgeMs: number): Promise<number> {
  let removed = 0;
  let names: string[];
  try {
    names = await fs.promises.readdir(dir);
  } catch {
    return 0;
  }
  const now = Date.now();
  for (const n of names) {
    if (!n.endsWith('.part')) continue;
    const p = path.join(dir, n);
    try {
      const st = await fs.promises.stat(p);
      if (now - st.mtimeMs > maxAgeMs) {
        await fs.promises.rm(p, { force: true });
        removed++;
      }
    } catch {
      /* raced with another sweeper or the job */
    }
  }
  return removed;
}
