import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { makeTmpDir } from '../../tests/fixtures-bad/harness';
import { ingestSettings } from './settings';
import { spoolPath, sweepSpool } from './spool';

const dir = makeTmpDir('keel-spool-unit-');
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('spool folder', () => {
  it('names spool files itself: random, inside the folder, never from the client', () => {
    const a = spoolPath(dir);
    const b = spoolPath(dir);
    expect(path.dirname(a)).toBe(dir);
    expect(path.basename(a)).toMatch(/^[0-9a-z]+-[0-9a-f]{24}\.part$/);
    expect(a).not.toBe(b);
  });

  it('sweeps spool files older than the limit, and nothing else', async () => {
    const old = spoolPath(dir);
    const fresh = spoolPath(dir);
    const other = path.join(dir, 'notes.txt');
    for (const f of [old, fresh, other]) fs.writeFileSync(f, 'x');
    const dayAgo = new Date(Date.now() - 25 * 3600 * 1000);
    fs.utimesSync(old, dayAgo, dayAgo);
    fs.utimesSync(other, dayAgo, dayAgo);
    expect(await sweepSpool(dir, 24 * 3600 * 1000)).toBe(1);
    expect(fs.existsSync(old)).toBe(false);
    expect(fs.existsSync(fresh)).toBe(true);
    expect(fs.existsSync(other)).toBe(true);
    expect(await sweepSpool(path.join(dir, 'missing'), 1)).toBe(0);
  });

  it('reads its settings from the environment and names a bad one', () => {
    const s = ingestSettings({ KEEL_SPOOL_DIR: dir, KEEL_UPLOAD_MAX_BYTES: '1000', KEEL_INGEST_SYNC_MAX_BYTES: '10' });
    expect(s).toEqual({ spoolDir: dir, uploadMaxBytes: 1000, syncMaxBytes: 10, maxGapSeconds: 600 });
    expect(() => ingestSettings({ KEEL_UPLOAD_MAX_BYTES: '-5' })).toThrow('Invalid ingest settings: KEEL_UPLOAD_MAX_BYTES: must not be negative');
  });
});
