// The client's file name is metadata only (server/ingest/open.ts cleanUploadName): what is kept
// of names that try to be paths, carry control or direction-override characters, or run long.
import { describe, expect, it } from 'vitest';
import { cleanUploadName, MAX_UPLOAD_NAME } from './open';

describe('cleanUploadName', () => {
  it('keeps an ordinary name as it is (UTF-8 included)', () => {
    expect(cleanUploadName('moorgate-2026-01-01.csv')).toBe('moorgate-2026-01-01.csv');
    expect(cleanUploadName('Saltreach Bay – ring-down °.cfg')).toBe('Saltreach Bay – ring-down °.cfg');
  });

  it('never keeps a path separator, a control character or a direction override', () => {
    expect(cleanUploadName('../../etc/passwd.csv')).toBe('.._.._etc_passwd.csv');
    expect(cleanUploadName('..\\windows\\keel.csv')).toBe('.._windows_keel.csv');
    expect(cleanUploadName('nul\u0000byte.csv')).toBe('nulbyte.csv');
    expect(cleanUploadName('bell\u0007\u001b[2Jtab\t.csv')).toBe('bell[2Jtab.csv');
    expect(cleanUploadName('ring\u202evsc.csv')).toBe('ringvsc.csv');
    expect(cleanUploadName('\ufeff  spaced.csv  ')).toBe('spaced.csv');
  });

  it('never answers an empty name or a dot name', () => {
    for (const n of ['', '   ', '\u0000', '.', '..', '\u202e']) expect(cleanUploadName(n)).toBe('upload');
  });

  it('shortens a long name to 255 characters, keeping the extension and whole characters', () => {
    const long = cleanUploadName(`${'x'.repeat(300)}.csv`);
    expect(long).toBe(`${'x'.repeat(MAX_UPLOAD_NAME - 4)}.csv`);
    // 🌊 takes two UTF-16 code units: 100 + 2·75 + 4 = 254, one more would be 256
    const emoji = cleanUploadName(`${'∿'.repeat(100)}${'🌊'.repeat(200)}.dat`);
    expect(emoji).toBe(`${'∿'.repeat(100)}${'🌊'.repeat(75)}.dat`);
    expect(emoji.length).toBeLessThanOrEqual(MAX_UPLOAD_NAME);
  });
});
