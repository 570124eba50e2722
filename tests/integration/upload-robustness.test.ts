// Uploads under abuse, through the real server (PostgreSQL, Redis, server process):
//  - a client that cuts its multipart request off half-way (CSV, and a COMTRADE pair cut inside
//    its second file) leaves no recording and no spool file, and the same upload sent whole
//    afterwards is accepted (nothing of the aborted one was taken for a duplicate);
//  - file names that try to reach the file system (../../, absolute paths, back-slashes, NUL and
//    control characters, 300 characters) are spooled under server-chosen names only: nothing is
//    created outside the spool folder, and the name is kept as cleaned-up metadata;
//  - 100 seeded fuzz cases (tests/fuzz/mutate.ts): every answer is 201, or a 400 / 409 / 413 with
//    a code and a reason — never a 5xx, never a hang; it is the parser's own verdict on the same
//    bytes (same refusal message); a refusal stores nothing; an accepted file is really stored.
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDb, type Db } from '../../db/client';
import { readRecordingSamples } from '../../db/queries/recordings';
import { csvText, comtradeAsciiDat, comtradeCfg, tarrowSeries } from '../fixtures-bad/make-files';
import { makeTmpDir } from '../fixtures-bad/harness';
import { describeCase, makeCase, type FuzzFile } from '../fuzz/mutate';
import { runParserCase } from '../fuzz/parser-case';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const SYNC_LIMIT = 1 << 20;
/** 100 in `npm test`; `npm run bench:fuzz` runs this test with 5 000 (KEEL_UPLOAD_FUZZ_CASES). */
const HTTP_FUZZ_CASES = Number(process.env.KEEL_UPLOAD_FUZZ_CASES ?? 100);
/** A seed range of its own (the unit fuzz starts at 1). */
const HTTP_FUZZ_FIRST_SEED = 1_000_001;

let stack: Stack;
let db: Db;
let root: string;
let spoolDir: string;
let engineer: Client;

interface Part {
  /** Raw bytes of the filename parameter (so that NUL and control bytes can be sent). */
  filename: string | Buffer;
  /** Send this as the whole file-name parameter instead (e.g. an RFC 5987 filename*=…). */
  nameParam?: string;
  content: string | Buffer;
}

function multipart(parts: Part[]) {
  const boundary = `----keel-robust-${Math.random().toString(36).slice(2)}`;
  const chunks: Buffer[] = [];
  for (const p of parts) {
    const name = p.nameParam
      ? [Buffer.from(p.nameParam)]
      : [Buffer.from('filename="'), typeof p.filename === 'string' ? Buffer.from(p.filename) : p.filename, Buffer.from('"')];
    chunks.push(
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; `),
      ...name,
      Buffer.from('\r\nContent-Type: application/octet-stream\r\n\r\n'),
      typeof p.content === 'string' ? Buffer.from(p.content) : p.content,
      Buffer.from('\r\n'),
    );
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return { boundary, body: Buffer.concat(chunks) };
}

async function upload(client: Client, parts: Part[], timeoutMs = 20_000): Promise<{ status: number; body: any }> {
  const { boundary, body } = multipart(parts);
  const token = await client.fetchCsrf();
  const res = await fetch(`${stack.baseUrl}/api/recordings`, {
    method: 'POST',
    headers: { 'Content-Type': `multipart/form-data; boundary=${boundary}`, 'x-csrf-token': token, Cookie: client.cookieHeader() },
    body,
    signal: AbortSignal.timeout(timeoutMs),
  });
  const text = await res.text();
  return { status: res.status, body: text && (res.headers.get('content-type') ?? '').includes('json') ? JSON.parse(text) : text };
}

/** Every file and folder under `dir`, relative to it. */
function tree(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true })) {
      const p = path.join(d, e.name);
      out.push(path.relative(dir, p));
      if (e.isDirectory()) walk(p);
    }
  };
  walk(dir);
  return out.sort();
}

const spoolFiles = () => (fs.existsSync(spoolDir) ? fs.readdirSync(spoolDir) : []);
const serverStarts = () => stack.logs.filter((l) => l.startsWith('[server]') && l.includes('listening on')).length;

let startOffset = 0;
/** Distinct start times, so that every upload of this file has bytes of its own. */
const series = (frames: number) => tarrowSeries(frames, 30, 1_767_225_600 + 86_400 * 30 + (startOffset += 3600));

beforeAll(async () => {
  root = makeTmpDir('keel-upload-robust-');
  // The spool sits two folders deep, so that "../../x" from it would still land inside `root`.
  spoolDir = path.join(root, 'a', 'b', 'spool');
  stack = await startStack({
    worker: false,
    mailSink: false,
    env: { KEEL_SPOOL_DIR: spoolDir, KEEL_INGEST_SYNC_MAX_BYTES: String(SYNC_LIMIT), KEEL_UPLOAD_MAX_BYTES: String(8 << 20), KEEL_AUTO_SCAN: '0' },
  });
  db = createDb(stack.pool);
  engineer = createClient(stack.baseUrl);
  expect((await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
});

afterAll(async () => {
  await stack?.stop();
  if (root) fs.rmSync(root, { recursive: true, force: true });
});

// ---------------------------------------------------------------- aborted uploads

/**
 * Sends the multipart body of `parts` up to byte `cutAt`, waits until the server has started a
 * spool file, then destroys the connection (a browser tab closed, a network cut).
 */
async function abortedUpload(client: Client, parts: Part[], cutAt: number, spoolFilesBeforeCut: number): Promise<void> {
  const { boundary, body } = multipart(parts);
  expect(cutAt).toBeLessThan(body.length);
  const token = await client.fetchCsrf();
  const url = new URL(`${stack.baseUrl}/api/recordings`);
  const req = http.request({
    host: url.hostname,
    port: url.port,
    path: url.pathname,
    method: 'POST',
    headers: {
      'Content-Type': `multipart/form-data; boundary=${boundary}`,
      'Content-Length': String(body.length), // announces the whole body; only part of it comes
      'x-csrf-token': token,
      Cookie: client.cookieHeader(),
    },
  });
  const answered = new Promise<number | 'no answer'>((resolve) => {
    req.on('response', (res) => resolve(res.statusCode ?? 0));
    req.on('error', () => resolve('no answer'));
    req.on('close', () => resolve('no answer'));
  });
  // In slices, so that the server is seen spooling before the cut.
  for (let at = 0; at < cutAt; at += 16 * 1024) {
    await new Promise<void>((resolve, reject) => req.write(body.subarray(at, Math.min(cutAt, at + 16 * 1024)), (e) => (e ? reject(e) : resolve())));
  }
  await waitFor(async () => spoolFiles().length >= spoolFilesBeforeCut, 'the server to spool the first part');
  req.destroy();
  expect(await answered).toBe('no answer');
}

describe('an upload cut off half-way', () => {
  it('a CSV cut in the middle of its file leaves no recording and no spool file; sent whole later, it is accepted', async () => {
    const before = await rowCounts(stack.pool);
    const text = csvText(series(9000)); // ~420 kB
    const parts = [{ filename: 'cut-off.csv', content: text }];
    await abortedUpload(engineer, parts, 200_000, 1);
    await waitFor(async () => spoolFiles().length === 0, 'the partial spool file to be removed', 10_000);
    expect(await rowCounts(stack.pool)).toEqual(before);
    expect((await fetch(`${stack.baseUrl}/api/health`)).status).toBe(200);

    // Not a duplicate of anything: the aborted upload left no checksum behind.
    const whole = await upload(engineer, parts);
    expect(whole.status, JSON.stringify(whole.body)).toBe(201);
    expect(whole.body.recording).toMatchObject({ fileName: 'cut-off.csv', status: 'ready', sampleCount: 9000 });
    expect(spoolFiles()).toEqual([]);
  });

  it('a COMTRADE pair cut inside its .dat loses the .cfg already spooled too', async () => {
    const before = await rowCounts(stack.pool);
    const s = series(3000);
    const cfg = comtradeCfg(s);
    const dat = comtradeAsciiDat(s);
    const parts = [
      { filename: 'cut.cfg', content: cfg },
      { filename: 'cut.dat', content: dat },
    ];
    // the .cfg part is complete, the .dat part is cut after ~60 kB of its data
    const cutAt = Buffer.byteLength(cfg) + 400 + 60_000;
    await abortedUpload(engineer, parts, cutAt, 2);
    await waitFor(async () => spoolFiles().length === 0, 'both spool files to be removed', 10_000);
    expect(await rowCounts(stack.pool)).toEqual(before);

    const whole = await upload(engineer, parts);
    expect(whole.status, JSON.stringify(whole.body)).toBe(201);
    expect(whole.body.recording).toMatchObject({ fileName: 'cut.cfg', status: 'ready', sampleCount: 3000 });
    expect(spoolFiles()).toEqual([]);
  });
});

// ---------------------------------------------------------------- file names

describe('file names cannot reach the file system', () => {
  // busboy keeps only the last path segment; Keel then drops control and bidirectional-override
  // characters and shortens the name keeping its extension. Raw control bytes inside a quoted
  // name make the part header malformed: refused before anything is spooled.
  const hostile: { what: string; filename?: string | Buffer; nameParam?: string; stored: string | null }[] = [
    { what: 'parent folders', filename: '../../etc/passwd.csv', stored: 'passwd.csv' },
    { what: 'many parent folders to /tmp', filename: '../../../../../../tmp/keel-escape.csv', stored: 'keel-escape.csv' },
    { what: 'an absolute path', filename: '/etc/keel-absolute.csv', stored: 'keel-absolute.csv' },
    { what: 'back-slashes', filename: '..\\..\\windows\\keel.csv', stored: 'keel.csv' },
    { what: 'a raw NUL byte', filename: Buffer.from('nul\u0000byte.csv', 'latin1'), stored: null },
    { what: 'raw control characters', filename: Buffer.from('bell\u0007and\u001bescape.csv', 'latin1'), stored: null },
    { what: 'an encoded path (RFC 5987)', nameParam: "filename*=UTF-8''..%2F..%2Fetc%2Fkeel-star.csv", stored: 'keel-star.csv' },
    { what: 'an encoded NUL byte', nameParam: "filename*=UTF-8''nul%00byte.csv", stored: 'nulbyte.csv' },
    { what: 'encoded control characters', nameParam: "filename*=UTF-8''bell%07and%1Bescape.csv", stored: 'bellandescape.csv' },
    { what: 'a right-to-left override', nameParam: "filename*=UTF-8''ring%E2%80%AEvsc.csv", stored: 'ringvsc.csv' },
    { what: 'a UTF-8 name', filename: 'saltreach–bay °.csv', stored: 'saltreach–bay °.csv' },
    { what: 'a 304-character name', filename: `${'x'.repeat(300)}.csv`, stored: `${'x'.repeat(251)}.csv` },
  ];

  it('spools them under server-chosen names only and keeps each name as clean metadata', async () => {
    const passwd = fs.statSync('/etc/passwd');
    const rootBefore = tree(root);
    const escapes = () => fs.readdirSync(os.tmpdir()).filter((n) => n.startsWith('keel-escape') || n === 'keel.csv' || n === 'keel-star.csv');
    const tmpBefore = escapes();
    const got: (string | null)[] = [];
    for (const h of hostile) {
      const r = await upload(engineer, [{ filename: h.filename ?? '', nameParam: h.nameParam, content: csvText(series(60)) }]);
      if (r.status === 400) {
        expect(r.body.error.message, h.what).toMatch(/\S{8}/);
        got.push(null);
        continue;
      }
      expect(r.status, `${h.what}: ${JSON.stringify(r.body)}`).toBe(201);
      const name: string = r.body.recording.fileName;
      got.push(name);
      const stored = await stack.pool.query('select file_name from recordings where id = $1', [r.body.recording.id]);
      expect(stored.rows[0].file_name, h.what).toBe(name);
    }
    expect(got).toEqual(hostile.map((h) => h.stored));

    // Nothing was written anywhere but into the spool (now empty again).
    expect(spoolFiles()).toEqual([]);
    expect(tree(root)).toEqual(rootBefore);
    expect(fs.existsSync('/etc/keel-absolute.csv')).toBe(false);
    expect(fs.existsSync('/etc/keel-star.csv')).toBe(false);
    expect(fs.statSync('/etc/passwd').mtimeMs).toBe(passwd.mtimeMs);
    expect(escapes()).toEqual(tmpBefore);
    expect(serverStarts()).toBe(1);
  });
});

// ---------------------------------------------------------------- fuzz through the route

describe(`${HTTP_FUZZ_CASES} mutated uploads through the upload route`, () => {
  it('answer 201 or a 400 / 409 / 413 with a reason, as the parser does; refusals store nothing; accepted files are stored', async () => {
    const scratch = makeTmpDir('keel-fuzz-http-');
    const tally: Record<string, number> = {};
    const problems: string[] = [];
    try {
      for (let seed = HTTP_FUZZ_FIRST_SEED; seed < HTTP_FUZZ_FIRST_SEED + HTTP_FUZZ_CASES; seed++) {
        const c = makeCase(seed);
        const what = describeCase(c);
        const verdict = await runParserCase(c, scratch, 5000);
        const before = await rowCounts(stack.pool);
        let r: { status: number; body: any };
        try {
          r = await upload(engineer, c.files.map((f: FuzzFile) => ({ filename: f.name, content: f.content })), 15_000);
        } catch (err) {
          problems.push(`no answer within 15 s (${(err as Error).name}): ${what}`);
          continue;
        }
        const key = r.status === 201 ? '201' : `${r.status} ${r.body?.error?.code ?? '?'}`;
        tally[key] = (tally[key] ?? 0) + 1;
        if (![201, 400, 409, 413].includes(r.status)) {
          problems.push(`status ${r.status} ${JSON.stringify(r.body).slice(0, 300)}: ${what}`);
          continue;
        }
        if (spoolFiles().length) problems.push(`spool not empty after the answer: ${what}`);
        if (r.status === 201) {
          if (verdict.kind !== 'accepted') problems.push(`the route accepted what the parser ${verdict.kind} (${verdict.message}): ${what}`);
          const rec = r.body.recording;
          const stored = await readRecordingSamples(db, { recordingId: rec.id });
          const ok =
            rec.status === 'ready' &&
            stored.channels.length === rec.channelCount &&
            rec.channelCount > 0 &&
            stored.channels.every((ch) => ch.values.length === rec.sampleCount) &&
            stored.channels.some((ch) => ch.values.some((v) => Number.isFinite(v)));
          if (!ok) problems.push(`accepted but not stored whole (recording ${rec.id}): ${what}`);
          continue;
        }
        const err = r.body?.error;
        if (!err || typeof err.code !== 'string' || typeof err.message !== 'string' || err.message.trim().length < 8) {
          problems.push(`refusal without a code and a reason ${JSON.stringify(r.body).slice(0, 200)}: ${what}`);
          continue;
        }
        if (r.status === 409) {
          // the same bytes as an earlier accepted case (a mutation that changed nothing that matters)
          if (err.code !== 'DUPLICATE' || verdict.kind !== 'accepted') problems.push(`409 ${err.code} for a parser ${verdict.kind}: ${what}`);
        } else if (r.status === 400) {
          if (verdict.kind !== 'refused' || verdict.message !== err.message) {
            problems.push(`400 "${err.message}" but the parser said ${verdict.kind} "${verdict.message}": ${what}`);
          }
        }
        const after = await rowCounts(stack.pool);
        if (JSON.stringify(after) !== JSON.stringify(before)) problems.push(`a refusal (${err.code}) changed the database: ${what}`);
      }
    } finally {
      fs.rmSync(scratch, { recursive: true, force: true });
    }
    console.log(`[upload-fuzz] seeds ${HTTP_FUZZ_FIRST_SEED}..${HTTP_FUZZ_FIRST_SEED + HTTP_FUZZ_CASES - 1}: ${JSON.stringify(tally)}`);
    expect(problems).toEqual([]);
    expect(tally['201'] ?? 0).toBeGreaterThan(0);
    expect((tally['400 BAD_FILE'] ?? 0) + (tally['400 UNMAPPED_COLUMNS'] ?? 0)).toBeGreaterThan(HTTP_FUZZ_CASES / 2);
    // the server is the process that started: no crash along the way
    expect(serverStarts()).toBe(1);
    expect((await fetch(`${stack.baseUrl}/api/health`)).status).toBe(200);
  }, Math.max(300_000, HTTP_FUZZ_CASES * 1000));
});
