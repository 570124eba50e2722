// Picks the reader for an upload from its file names: one .csv, one .cff, or a .cfg with its
// .dat. File names are only looked at here (the extension) and shown in messages; the files
// themselves are read from spool paths the server chose.
import { openComtradeSource, openCffSource } from './comtrade-source';
import { openCsvSource } from './csv-source';
import { FileRefusedError } from './errors';
import type { IngestSource } from './source';

export interface UploadedFile {
  /** Name the client gave the file (display only; never a path on this machine). */
  originalName: string;
  /** Spool path chosen by the server. */
  path: string;
  size: number;
  /** sha256 of the file's bytes, hex. */
  sha256: string;
}

export type UploadKind = 'csv' | 'cff' | 'comtrade';

/** Longest file name kept, in UTF-16 code units (the common file-system limit; longer names are shortened). */
export const MAX_UPLOAD_NAME = 255;

/**
 * The client's file name as Keel keeps it (metadata only: shown in lists and messages, never a
 * path). The multipart parser already keeps only the last path segment; here control characters
 * (an RFC 5987 name can carry %00, which PostgreSQL text cannot hold), bidirectional overrides
 * (U+202E makes "x<U+202E>vsc.exe" display as "xexe.csv") and path separators go, surrounding
 * blanks are trimmed, and a long name is shortened keeping its extension. Never empty.
 */
export function cleanUploadName(name: string): string {
  let n = name
    .normalize('NFC')
    .replace(/[\u0000-\u001f\u007f-\u009f\u200e\u200f\u202a-\u202e\u2066-\u2069\ufeff]/g, '')
    .replace(/[/\\]/g, '_')
    .trim();
  if (n === '' || n === '.' || n === '..') n = 'upload';
  if (n.length > MAX_UPLOAD_NAME) {
    const ext = /\.[A-Za-z0-9]{1,8}$/.exec(n)?.[0] ?? '';
    let head = '';
    // whole code points only: a cut never leaves half a surrogate pair
    for (const ch of n) {
      if (head.length + ch.length > MAX_UPLOAD_NAME - ext.length) break;
      head += ch;
    }
    n = head + ext;
  }
  return n;
}

export function extensionOf(name: string): string {
  const m = /\.([A-Za-z0-9]+)$/.exec(name);
  return m ? m[1].toLowerCase() : '';
}

const HOW = 'upload one .csv file, one .cff file, or a COMTRADE .cfg together with its .dat';

/** Classifies the files of one upload, refusing anything but the three accepted shapes. */
export function classifyUpload(files: UploadedFile[]): { kind: UploadKind; files: UploadedFile[] } {
  if (files.length === 0) throw new FileRefusedError('', `no file in the upload; ${HOW}`);
  const exts = files.map((f) => extensionOf(f.originalName));
  if (files.length === 1) {
    const [ext] = exts;
    if (ext === 'csv') return { kind: 'csv', files };
    if (ext === 'cff') return { kind: 'cff', files };
    if (ext === 'cfg') {
      throw new FileRefusedError('', `"${files[0].originalName}" came without its .dat; upload both files of the COMTRADE pair together`);
    }
    if (ext === 'dat') {
      throw new FileRefusedError('', `"${files[0].originalName}" came without its .cfg; upload both files of the COMTRADE pair together`);
    }
    throw new FileRefusedError('', `"${files[0].originalName}" is not a file type Keel reads; ${HOW}`);
  }
  if (files.length === 2) {
    const cfg = files.find((f) => extensionOf(f.originalName) === 'cfg');
    const dat = files.find((f) => extensionOf(f.originalName) === 'dat');
    if (cfg && dat) return { kind: 'comtrade', files: [cfg, dat] };
  }
  throw new FileRefusedError('', `${files.length} files (${files.map((f) => `"${f.originalName}"`).join(', ')}): ${HOW}`);
}

export async function openUpload(files: UploadedFile[]): Promise<{ kind: UploadKind; source: IngestSource }> {
  const c = classifyUpload(files);
  if (c.kind === 'csv') return { kind: c.kind, source: await openCsvSource(c.files[0].path) };
  if (c.kind === 'cff') return { kind: c.kind, source: await openCffSource(c.files[0].path, c.files[0].originalName) };
  const [cfg, dat] = c.files;
  return {
    kind: c.kind,
    source: await openComtradeSource({ cfgPath: cfg.path, cfgName: cfg.originalName, datPath: dat.path, datName: dat.originalName }),
  };
}
