// Uploads end to end: the real server, PostgreSQL, Redis and a worker process.
//  - good CSV / COMTRADE / .cff files land in one transaction (recording, channels, chunks,
//    quality) and read back sample for sample;
//  - every file of the malformed corpus (tests/fixtures-bad) is refused with its message, and the
//    database holds exactly the rows it held before (every table counted), the spool folder empty;
//  - duplicates (409 DUPLICATE), unknown columns (400 UNMAPPED_COLUMNS, then a mapping), the size
//    limit (413), roles;
//  - large files go through the ingest job (202 + analysis), good and bad.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createDb, type Db } from '../../db/client';
import { readRecordingSamples } from '../../db/queries/recordings';
import { BAD_CASES } from '../fixtures-bad/cases';
import { FILES_DIR } from '../fixtures-bad/generate';
import { comtradeBinaryDat, comtradeCff, comtradeCfg, comtradeAsciiDat, csvText, tarrowSeries, type Series } from '../fixtures-bad/make-files';
import { createClient, type Client, type HttpResult } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

const UPLOAD_LIMIT = 2 * 1024 * 1024;
const SYNC_LIMIT = 256 * 1024;

let stack: Stack;
let db: Db;
let spoolDir: string;
let engineer: Client;
let operator: Client;

interface Part {
  name: string;
  content: string | Buffer;
}

/** POSTs a multipart upload with the client's session and CSRF token. */
async function upload(client: Client, files: Part[], mapping?: Record<string, string>): Promise<HttpResult> {
  const boundary = `----keel-test-${Math.random().toString(36).slice(2)}`;
  const chunks: Buffer[] = [];
  for (const f of files) {
    chunks.push(
      Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${f.name}"\r\nContent-Type: application/octet-stream\r\n\r\n`),
      typeof f.content === 'string' ? Buffer.from(f.content) : f.content,
      Buffer.from('\r\n'),
    );
  }
  if (mapping) {
    chunks.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="mapping"\r\n\r\n${JSON.stringify(mapping)}\r\n`));
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  const body = Buffer.concat(chunks);
  const token = await client.fetchCsrf();
  const res = await fetch(`${stack.baseUrl}/api/recordings`, {
    method: 'POST',
    headers: { 'Content-Type': `multipart/form-data; boundary=${boundary}`, 'x-csrf-token': token, Cookie: client.cookieHeader() },
    body,
  });
  const text = await res.text();
  return { status: res.status, body: text && (res.headers.get('content-type') ?? '').includes('json') ? JSON.parse(text) : text, headers: res.headers };
}

/** Uploads from a distinct start time so that every test file has its own checksum. */
let startOffset = 0;
function series(frames: number, rate = 30): Series {
  startOffset += 3600;
  return tarrowSeries(frames, rate, 1_735_689_600 + startOffset);
}

function spoolFiles(): string[] {
  return fs.existsSync(spoolDir) ? fs.readdirSync(spoolDir) : [];
}

async function expectStored(recordingId: number, s: Series, tol: number) {
  const rec = await readRecordingSamples(db, { recordingId });
  expect(rec.rate).toBe(s.rate);
  expect(rec.startTime).toBeCloseTo(s.start, 6);
  for (const [name, want] of Object.entries(s.channels)) {
    const got = rec.channels.find((c) => c.name === name);
    expect(got, name).toBeDefined();
    expect(got!.values.length).toBe(want.length);
    let worst = 0;
    want.forEach((v, i) => {
      if (Number.isNaN(v)) expect(got!.values[i]).toBeNaN();
      else worst = Math.max(worst, Math.abs(got!.values[i] - v));
    });
    expect(worst, name).toBeLessThanOrEqual(tol);
  }
}

beforeAll(async () => {
  spoolDir = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-spool-test-'));
  stack = await startStack({
    env: {
      KEEL_SPOOL_DIR: spoolDir,
      KEEL_UPLOAD_MAX_BYTES: String(UPLOAD_LIMIT),
      KEEL_INGEST_SYNC_MAX_BYTES: String(SYNC_LIMIT),
    },
  });
  db = createDb(stack.pool);
  engineer = createClient(stack.baseUrl);
  expect((await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
  operator = createClient(stack.baseUrl);
  expect((await operator.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD)).status).toBe(200);
});

afterAll(async () => {
  await stack?.stop();
  fs.rmSync(spoolDir, { recursive: true, force: true });
});

describe('good uploads within the request', () => {
  it('stores a CSV in one go: recording, channels with quality, chunks that read back exactly', async () => {
    const s = series(4000);
    s.channels['moorgate.freq'][100] = NaN;
    const r = await upload(engineer, [{ name: 'moorgate-ambient.csv', content: csvText(s) }]);
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const rec = r.body.recording;
    expect(r.body.analysis).toBeNull();
    expect(rec).toMatchObject({
      fileName: 'moorgate-ambient.csv',
      format: 'csv',
      status: 'ready',
      rate: 30,
      channelCount: 3,
      sampleCount: 4000,
      uploadedBy: { displayName: 'Demo Engineer' },
      quality: { rows: 4000, duplicates: 0, gaps: 0, missingFrames: 0, startEpoch: s.start },
    });
    expect(rec.checksum).toMatch(/^[0-9a-f]{64}$/);
    expect(rec.startTime).toBe(new Date(s.start * 1000).toISOString());
    expect(Date.parse(rec.endTime) / 1000).toBeCloseTo(s.start + 3999 / 30, 3);
    const freq = rec.channels.find((c: { name: string }) => c.name === 'moorgate.freq');
    expect(freq.quality).toMatchObject({ samples: 4000, dropouts: 1, gaps: 1 });
    // 4000 frames in chunks of 3600: two chunks per channel.
    const chunks = await stack.pool.query('select count(*)::int as n from sample_chunks where recording_id = $1', [rec.id]);
    expect(chunks.rows[0].n).toBe(6);
    await expectStored(rec.id, s, 0);
    expect(spoolFiles()).toEqual([]);

    const got = await engineer.get(`/api/recordings/${rec.id}`);
    expect(got.status).toBe(200);
    expect(got.body.recording.channels.map((c: { name: string }) => c.name)).toEqual(['moorgate.angle', 'moorgate.freq', 'saltreach-bay.angle']);
    const list = await operator.get('/api/recordings');
    expect(list.body.recordings.some((x: { id: number }) => x.id === rec.id)).toBe(true);
  });

  it('keeps a long gap as missing samples, storing no chunk for a stretch with no data', async () => {
    const s = series(9000);
    // Frames 3500..7300 missing: chunk 1 (frames 3600..7199) holds nothing and is not stored.
    const lines = csvText(s).trimEnd().split('\n');
    const kept = lines.filter((_, i) => i === 0 || i - 1 < 3500 || i - 1 > 7300);
    const r = await upload(engineer, [{ name: 'gap.csv', content: kept.join('\n') }]);
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    const id = r.body.recording.id;
    expect(r.body.recording).toMatchObject({ sampleCount: 9000, quality: { rows: 9000 - 3801, gaps: 1, missingFrames: 3801 } });
    const chunks = await stack.pool.query('select chunk_index from sample_chunks where recording_id = $1 order by 1', [id]);
    expect(chunks.rows.map((x) => x.chunk_index)).toEqual([0, 0, 0, 2, 2, 2]);
    const part = await readRecordingSamples(db, { recordingId: id, channels: ['moorgate.freq'], from: s.start + 3490 / 30, to: s.start + 7310 / 30 });
    const v = part.channels[0].values;
    expect(v.length).toBe(7310 - 3490 + 1);
    expect(part.startTime).toBeCloseTo(s.start + 3490 / 30, 6);
    for (let f = 3490; f <= 7310; f++) {
      const want = f >= 3500 && f <= 7300 ? NaN : s.channels['moorgate.freq'][f];
      if (Number.isNaN(want)) expect(v[f - 3490], `frame ${f}`).toBeNaN();
      else expect(v[f - 3490], `frame ${f}`).toBe(want);
    }
    const q = r.body.recording.channels[0].quality;
    expect(q).toMatchObject({ samples: 9000, dropouts: 3801, gaps: 1, longestGap: 3801 });
  });

  it('answers min/max buckets for plotting, over a time range', async () => {
    const s = series(900);
    s.channels['moorgate.angle'][450] = 80; // a spike that must survive decimation
    const r = await upload(engineer, [{ name: 'spike.csv', content: csvText(s) }]);
    expect(r.status).toBe(201);
    const id = r.body.recording.id;
    const all = await operator.get(`/api/recordings/${id}/samples?channel=moorgate.angle&maxPoints=30`);
    expect(all.status, JSON.stringify(all.body)).toBe(200);
    expect(all.body).toMatchObject({ channel: 'moorgate.angle', unit: 'deg', rate: 30, bucketSamples: 30, bucketSeconds: 1 });
    expect(all.body.t).toHaveLength(30);
    expect(Math.max(...all.body.max)).toBe(80);
    // 10 s from second 5: frames 150..450 inclusive.
    const part = await operator.get(`/api/recordings/${id}/samples?channel=moorgate.angle&from=${s.start + 5}&to=${s.start + 15}&maxPoints=1000`);
    expect(part.body.bucketSamples).toBe(1);
    expect(part.body.t).toHaveLength(301);
    expect(part.body.from).toBeCloseTo(s.start + 5, 6);
    expect(part.body.max[300]).toBe(80);
    const bad = await operator.get(`/api/recordings/${id}/samples?channel=greyscar.angle`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toBe(`Recording ${id} has no channel "greyscar.angle"`);
  });

  it('stores COMTRADE pairs (ASCII, BINARY) and .cff files', async () => {
    const s = series(300);
    const ascii = await upload(engineer, [
      { name: 'trip.cfg', content: comtradeCfg(s) },
      { name: 'trip.dat', content: comtradeAsciiDat(s) },
    ]);
    expect(ascii.status, JSON.stringify(ascii.body)).toBe(201);
    expect(ascii.body.recording).toMatchObject({ fileName: 'trip.cfg', format: 'comtrade-ascii', rate: 30, sampleCount: 300 });
    await expectStored(ascii.body.recording.id, s, 0.0005 + 1e-9);

    const s2 = series(300);
    const bin = await upload(engineer, [
      { name: 'trip2.dat', content: comtradeBinaryDat(s2, 'BINARY') },
      { name: 'trip2.cfg', content: comtradeCfg(s2, { rev: 2013, fileType: 'BINARY' }) },
    ]);
    expect(bin.status, JSON.stringify(bin.body)).toBe(201);
    expect(bin.body.recording.format).toBe('comtrade-binary');
    await expectStored(bin.body.recording.id, s2, 0.0005 + 1e-9);

    const s3 = series(300, 60);
    const cff = await upload(engineer, [{ name: 'trip3.cff', content: comtradeCff(comtradeCfg(s3, { rev: 2013 }), comtradeAsciiDat(s3), 'ASCII') }]);
    expect(cff.status, JSON.stringify(cff.body)).toBe(201);
    expect(cff.body.recording).toMatchObject({ format: 'comtrade-ascii', rate: 60 });
    await expectStored(cff.body.recording.id, s3, 0.0005 + 1e-9);
  });
});

describe('refusals leave nothing behind', () => {
  it('refuses a second upload of the same bytes as DUPLICATE, naming the recording', async () => {
    const content = csvText(series(60));
    const first = await upload(engineer, [{ name: 'once.csv', content }]);
    expect(first.status).toBe(201);
    const before = await rowCounts(stack.pool);
    const again = await upload(engineer, [{ name: 'renamed.csv', content }]);
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('DUPLICATE');
    expect(again.body.error.message).toBe(`This file was already uploaded as recording ${first.body.recording.id} ("once.csv")`);
    expect(await rowCounts(stack.pool)).toEqual(before);
  });

  it('lists unknown columns and the channels to choose from, then takes a mapping', async () => {
    const s = series(90);
    const text = csvText(s).replace('saltreach-bay.angle', 'PMU 12 angle');
    const before = await rowCounts(stack.pool);
    const r = await upload(engineer, [{ name: 'pmu12.csv', content: text }]);
    expect(r.status).toBe(400);
    expect(r.body.error.code).toBe('UNMAPPED_COLUMNS');
    expect(r.body.error.message).toBe(
      'line 1: column "PMU 12 angle" matches no channel of the network; re-send the upload with a mapping {column → channel name or "ignore"}',
    );
    const details = r.body.error.details as { path: string; message: string }[];
    expect(details.filter((d) => d.path.startsWith('mapping.')).map((d) => d.path)).toEqual(['mapping.PMU 12 angle']);
    const known = details.filter((d) => d.path === 'knownChannels').map((d) => d.message);
    expect(known).toContain('saltreach-bay.angle');
    expect(known).toContain('moorgate.mw');
    expect(await rowCounts(stack.pool)).toEqual(before);

    const bad = await upload(engineer, [{ name: 'pmu12.csv', content: text }], { 'PMU 12 angle': 'nowhere.angle' });
    expect(bad.status).toBe(400);
    expect(bad.body.error).toMatchObject({ code: 'VALIDATION', message: 'mapping sends column "PMU 12 angle" to "nowhere.angle", which is not a channel of the network' });

    const ok = await upload(engineer, [{ name: 'pmu12.csv', content: text }], { 'PMU 12 angle': 'gullhaven.angle' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    const ch = ok.body.recording.channels.find((c: { name: string }) => c.name === 'gullhaven.angle');
    expect(ch.sourceName).toBe('PMU 12 angle');
    const rec = await readRecordingSamples(db, { recordingId: ok.body.recording.id, channels: ['gullhaven.angle'] });
    expect(Array.from(rec.channels[0].values)).toEqual(s.channels['saltreach-bay.angle']);
  });

  for (const c of BAD_CASES) {
    it(`refuses ${c.what} with its line and reason`, async () => {
      const before = await rowCounts(stack.pool);
      const files = c.files.map((name) => ({ name, content: fs.readFileSync(path.join(FILES_DIR, name)) }));
      const r = await upload(engineer, files);
      expect(r.status, JSON.stringify(r.body)).toBe(400);
      expect(r.body.error.code).toBe(c.code);
      expect(r.body.error.message).toBe(c.message);
      expect(await rowCounts(stack.pool)).toEqual(before);
      expect(spoolFiles()).toEqual([]);
    });
  }

  it('refuses a file over the size limit with 413, keeping nothing of it', async () => {
    const before = await rowCounts(stack.pool);
    const s = series(Math.ceil(UPLOAD_LIMIT / 30)); // ~45 bytes a row
    const big = csvText(s);
    expect(big.length).toBeGreaterThan(UPLOAD_LIMIT);
    const r = await upload(engineer, [{ name: 'huge.csv', content: big }]);
    expect(r.status).toBe(413);
    expect(r.body.error).toEqual({ code: 'PAYLOAD_TOO_LARGE', message: 'A file is larger than the upload limit of 2 MiB' });
    expect(await rowCounts(stack.pool)).toEqual(before);
    expect(spoolFiles()).toEqual([]);
  });

  it('refuses the upload to an operator (403) and to nobody signed in (401), reading nothing', async () => {
    const before = await rowCounts(stack.pool);
    const r = await upload(operator, [{ name: 'op.csv', content: csvText(series(30)) }]);
    expect(r.status).toBe(403);
    expect(r.body.error.code).toBe('FORBIDDEN');
    const anon = createClient(stack.baseUrl);
    const a = await upload(anon, [{ name: 'anon.csv', content: csvText(series(30)) }]);
    expect(a.status).toBe(401);
    expect(await rowCounts(stack.pool)).toEqual(before);
    expect(spoolFiles()).toEqual([]);
  });

  it('refuses a JSON body', async () => {
    const j = await engineer.post('/api/recordings', { file: 'time,x' });
    expect(j.status).toBe(400);
    expect(j.body.error.message).toBe('Send the recording as multipart/form-data with the file(s) in the field "file"');
  });
});

describe('large uploads through the ingest job', () => {
  it('answers 202 with the ingest analysis, which reaches done with the data stored', async () => {
    const s = series(8000); // ~370 kB: over the 256 kB in-request limit of this stack
    const text = csvText(s);
    expect(text.length).toBeGreaterThan(SYNC_LIMIT);
    const r = await upload(engineer, [{ name: '../../etc/big-ambient.csv', content: text }]);
    expect(r.status, JSON.stringify(r.body)).toBe(202);
    expect(r.body.recording.status).toBe('ingesting');
    expect(r.body.analysis).toMatchObject({ status: 'queued', progress: 0 });
    // The spool holds server-chosen names only.
    for (const f of spoolFiles()) expect(f).toMatch(/^[0-9a-z]+-[0-9a-f]{24}\.part$/);
    const id = r.body.analysis.id;
    const done = await waitFor(async () => {
      const a = await operator.get(`/api/analyses/${id}`);
      return a.body.analysis.status === 'done' || a.body.analysis.status === 'failed' ? a.body.analysis : null;
    }, 'the ingest job');
    expect(done).toMatchObject({ kind: 'ingest', status: 'done', progress: 1, error: null, recordingId: r.body.recording.id });
    const rec = await engineer.get(`/api/recordings/${r.body.recording.id}`);
    expect(rec.body.recording).toMatchObject({ status: 'ready', sampleCount: 8000, rate: 30 });
    await expectStored(r.body.recording.id, s, 0);
    await waitFor(async () => spoolFiles().length === 0, 'the spool file to be removed');
  });

  it('fails the analysis with the line and reason of a bad large file; no samples kept; a retry replaces it', async () => {
    const s = series(8000);
    const lines = csvText(s).split('\n');
    lines[7001] = lines[7001].replace(/,[^,]*$/, ',n/a'); // line 7002
    const text = lines.join('\n');
    const r = await upload(engineer, [{ name: 'late-fault.csv', content: text }]);
    expect(r.status).toBe(202);
    const recId = r.body.recording.id;
    const failed = await waitFor(async () => {
      const a = await engineer.get(`/api/analyses/${r.body.analysis.id}`);
      return a.body.analysis.status === 'failed' ? a.body.analysis : null;
    }, 'the ingest job to fail');
    expect(failed.error).toBe("line 7002: column 'saltreach-bay.angle': value 'n/a' is not a number");
    const rec = await engineer.get(`/api/recordings/${recId}`);
    expect(rec.body.recording).toMatchObject({ status: 'failed', error: failed.error, channels: [] });
    const chunks = await stack.pool.query('select count(*)::int as n from sample_chunks where recording_id = $1', [recId]);
    expect(chunks.rows[0].n).toBe(0);
    await waitFor(async () => spoolFiles().length === 0, 'the spool file to be removed');

    // The same bytes again: not a duplicate of a failed upload — it replaces it (and fails again).
    const again = await upload(engineer, [{ name: 'late-fault.csv', content: text }]);
    expect(again.status).toBe(202);
    const gone = await stack.pool.query('select count(*)::int as n from recordings where id = $1', [recId]);
    expect(gone.rows[0].n).toBe(0);
  });

  it('deletes a recording with its samples', async () => {
    const r = await upload(engineer, [{ name: 'to-delete.csv', content: csvText(series(120)) }]);
    expect(r.status).toBe(201);
    const id = r.body.recording.id;
    expect((await operator.del(`/api/recordings/${id}`)).status).toBe(403);
    expect((await engineer.del(`/api/recordings/${id}`)).status).toBe(200);
    expect((await engineer.get(`/api/recordings/${id}`)).status).toBe(404);
    const chunks = await stack.pool.query('select count(*)::int as n from sample_chunks where recording_id = $1', [id]);
    expect(chunks.rows[0].n).toBe(0);
  });
});
