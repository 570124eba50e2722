// The malformed-upload corpus (tests/fixtures-bad): every file is refused with its expected
// message, verbatim — the line (or record) first at fault and the reason.
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { BAD_CASES } from '../../tests/fixtures-bad/cases';
import { corpusFiles, FILES_DIR } from '../../tests/fixtures-bad/generate';
import { makeTmpDir, refusal } from '../../tests/fixtures-bad/harness';

const dir = makeTmpDir();
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('malformed corpus', () => {
  it('holds at least 25 cases, and the committed files are what generate.ts makes', () => {
    expect(BAD_CASES.length).toBeGreaterThanOrEqual(25);
    const made = corpusFiles();
    for (const c of BAD_CASES) {
      for (const name of c.files) {
        const onDisk = fs.readFileSync(path.join(FILES_DIR, name));
        expect(onDisk.equals(Buffer.from(made[name])), name).toBe(true);
      }
    }
  });

  for (const c of BAD_CASES) {
    it(`refuses ${c.what} (${c.files.join(' + ')})`, async () => {
      const files = c.files.map((name) => ({ name, content: fs.readFileSync(path.join(FILES_DIR, name)) }));
      expect(await refusal(dir, files)).toEqual({ code: c.code, message: c.message });
    });
  }
});
