// COMTRADE uploads as ingest sources: a .cfg + .dat pair, or one .cff file (IEEE C37.111-2013,
// standard: the sections "--- file type: CFG ---", INF, HDR and "--- file type: DAT <type>[: n] ---",
// the data last). The .cfg (or the .cff's text sections) is read whole — it is small metadata —
// and the data part is streamed.
import fs from 'node:fs';
import { Readable } from 'node:stream';
import { decodeCfg, MAX_CFG_BYTES, parseComtradeConfig, type ComtradeConfig } from './comtrade-cfg';
import { asciiDatRows, asciiWhere, binaryDatRows, binaryWhere, type DatOptions } from './comtrade-dat';
import { checkTextEncoding } from './encoding';
import { FileRefusedError } from './errors';
import type { IngestSource } from './source';

function describe(
  cfg: ComtradeConfig,
  cfgLabel: string,
  cfgLineOffset = 0,
): Pick<IngestSource, 'columns' | 'declaredRate' | 'nominalHz' | 'headerWhere'> {
  return {
    // The analog channel lines start on the .cfg's third line (standard).
    headerWhere: `${cfgLabel} line ${3 + cfgLineOffset}`,
    columns: cfg.analog.map((c) => ({ name: c.id, unit: c.unit })),
    declaredRate:
      cfg.sampleRate > 0
        ? { rate: cfg.sampleRate, where: `${cfgLabel} line ${cfg.rateLine}`, lastSample: cfg.lastSample }
        : undefined,
    nominalHz: cfg.lineFrequency,
  };
}

export interface ComtradePair {
  cfgPath: string;
  cfgName: string;
  datPath: string;
  datName: string;
}

export async function openComtradeSource(files: ComtradePair): Promise<IngestSource> {
  const cfgStat = await fs.promises.stat(files.cfgPath);
  if (cfgStat.size > MAX_CFG_BYTES) {
    throw new FileRefusedError(files.cfgName, `the configuration file is larger than ${MAX_CFG_BYTES / 1024} KiB; is it really a .cfg?`);
  }
  const cfg = parseComtradeConfig(decodeCfg(await fs.promises.readFile(files.cfgPath), files.cfgName), files.cfgName);
  const { size } = await fs.promises.stat(files.datPath);
  const opts: DatOptions = { cfg, label: files.datName, cfgLabel: files.cfgName };
  const binary = cfg.fileType !== 'ASCII';
  if (size === 0) {
    throw new FileRefusedError(binary ? `${files.datName} record 1 (byte 0)` : `${files.datName} line 1`, 'the data file is empty');
  }
  if (!binary) await checkTextEncoding(files.datPath, files.datName);
  // The .dat is opened only when its rows are read: a stream opened here and closed at once (the
  // columns refused) would open the file after the caller deleted it, and its ENOENT error event
  // would have no listener left.
  let file: fs.ReadStream | null = null;
  return {
    format: 'comtrade',
    recordFormat: binary ? 'comtrade-binary' : 'comtrade-ascii',
    ...describe(cfg, files.cfgName),
    where: binary ? binaryWhere(opts) : asciiWhere(opts),
    totalBytes: size + cfgStat.size,
    bytesRead: () => cfgStat.size + (file?.bytesRead ?? 0),
    close: () => file?.destroy(),
    rows: (select) => {
      file = fs.createReadStream(files.datPath, { highWaterMark: 256 * 1024 });
      return binary ? binaryDatRows(file, opts, select) : asciiDatRows(file, opts, select);
    },
  };
}

const SECTION = /^---\s*file type:\s*([A-Za-z]+)(?:\s+([A-Za-z0-9]+))?\s*(?::\s*(\d+))?\s*---$/i;

/** Text before the DAT section (CFG, INF, HDR) larger than this is refused. */
const MAX_CFF_TEXT_BYTES = 4 * MAX_CFG_BYTES;

export async function openCffSource(path: string, name: string): Promise<IngestSource> {
  const { size } = await fs.promises.stat(path);
  if (size === 0) throw new FileRefusedError(`${name} line 1`, 'the file is empty');
  await checkTextEncoding(path, name);
  const file = fs.createReadStream(path, { highWaterMark: 256 * 1024 });
  const it = file[Symbol.asyncIterator]() as AsyncIterator<Buffer>;
  let ok = false;
  try {
    let buf: Buffer = Buffer.alloc(0);
    let bufStart = 0; // file offset of buf[0]
    let scan = 0;
    let line = 0;
    let section: string | null = null;
    const cfgLines: string[] = [];
    let cfgFirstLine = 0;
    let dat: { type: string; length?: number; line: number } | null = null;
    while (!dat) {
      const nl = buf.indexOf(0x0a, scan);
      if (nl < 0) {
        if (bufStart + buf.length > MAX_CFF_TEXT_BYTES) {
          throw new FileRefusedError(`${name} line ${line + 1}`, `no DAT section within the first ${MAX_CFF_TEXT_BYTES / (1 << 20)} MiB`);
        }
        const r = await it.next();
        if (r.done) {
          throw new FileRefusedError(
            `${name} line ${line + (buf.length > scan ? 1 : 0)}`,
            section === null ? 'no "--- file type: CFG ---" section: is this a .cff file?' : 'the file ends before its "--- file type: DAT … ---" section',
          );
        }
        scan = buf.length;
        buf = buf.length ? Buffer.concat([buf, r.value]) : r.value;
        continue;
      }
      line++;
      const text = buf.subarray(scan, nl).toString('utf8').replace(/\r$/, '');
      const m = SECTION.exec(text.trim());
      scan = nl + 1;
      if (m) {
        const kind = m[1].toUpperCase();
        if (section === null && kind !== 'CFG') {
          throw new FileRefusedError(`${name} line ${line}`, 'a .cff file must start with its "--- file type: CFG ---" section');
        }
        if (kind === 'DAT') {
          dat = { type: (m[2] ?? '').toUpperCase(), length: m[3] !== undefined ? Number(m[3]) : undefined, line };
        } else if (kind === 'CFG' || kind === 'INF' || kind === 'HDR') {
          section = kind;
          if (kind === 'CFG') cfgFirstLine = line;
        } else {
          throw new FileRefusedError(`${name} line ${line}`, `unknown section type ${JSON.stringify(m[1])}; expected CFG, INF, HDR or DAT`);
        }
      } else if (section === null) {
        throw new FileRefusedError(`${name} line ${line}`, 'a .cff file must start with its "--- file type: CFG ---" section');
      } else if (section === 'CFG') {
        cfgLines.push(text);
      }
      // Keep only the unread part: the text sections are not held once their lines are read.
      if (scan > 64 * 1024) {
        bufStart += scan;
        buf = buf.subarray(scan);
        scan = 0;
      }
    }
    const cfg = parseComtradeConfig(cfgLines.join('\n'), name, cfgFirstLine);
    const datType = dat.type;
    if (datType !== cfg.fileType) {
      throw new FileRefusedError(
        `${name} line ${dat.line}`,
        `the DAT section says ${datType || 'no type'}, but the configuration says ${cfg.fileType}`,
      );
    }
    const rest = buf.subarray(scan);
    const dataStart = bufStart + scan;
    const binary = cfg.fileType !== 'ASCII';
    if (binary && dat.length === undefined) {
      throw new FileRefusedError(`${name} line ${dat.line}`, 'a binary DAT section header must give its length in bytes ("--- file type: DAT BINARY: 12345 ---")');
    }
    const opts: DatOptions = {
      cfg,
      label: name,
      cfgLabel: `the CFG section of ${name}`,
      lineOffset: dat.line,
      byteOffset: dataStart,
      byteLength: binary ? dat.length : undefined,
    };
    async function* data(): AsyncGenerator<Buffer> {
      if (rest.length) yield rest;
      for (;;) {
        const r = await it.next();
        if (r.done) return;
        yield r.value;
      }
    }
    ok = true;
    return {
      format: 'cff',
      recordFormat: binary ? 'comtrade-binary' : 'comtrade-ascii',
      ...describe(cfg, name, cfgFirstLine),
      where: binary ? binaryWhere(opts) : asciiWhere(opts),
      totalBytes: size,
      bytesRead: () => file.bytesRead,
      close: () => file.destroy(),
      rows: (select) => (binary ? binaryDatRows(data(), opts, select) : asciiDatRows(Readable.from(data()), opts, select)),
    };
  } finally {
    if (!ok) file.destroy();
  }
}
