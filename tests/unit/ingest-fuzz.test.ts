// Seeded fuzzing of the upload parsers (CSV, COMTRADE .cfg/.dat pairs, .cff): valid uploads
// damaged by tests/fuzz/mutate.ts go through the ingest pipeline into memory. Every case must
// end in an accepted, self-consistent ingest or a refusal with a clear message — never an
// exception of another kind, never a hang (each case has a time limit, enforced from outside the
// process that runs it). The long run is `npm run bench:fuzz`. Replay one case with
// `makeCase(seed)`; KEEL_FUZZ_SEED moves the first seed for exploration.
//
// The regressions at the end are inputs the fuzzer found that once crashed or slipped through.
import fs from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { FileRefusedError, UnmappedColumnsError } from '../../server/ingest/errors';
import { csvText, tarrowSeries } from '../fixtures-bad/make-files';
import { ingestToMemory, makeTmpDir, refusal, writeUpload } from '../fixtures-bad/harness';
import { baseUploads, describeCase, makeCase, MUTATION_KINDS, rngFrom } from '../fuzz/mutate';
import { acceptedProblem, runParserCase } from '../fuzz/parser-case';
import { runParserFuzz } from '../fuzz/parser-driver';

const CASES = 400;
const FIRST_SEED = Number(process.env.KEEL_FUZZ_SEED ?? 1);
const dir = makeTmpDir('keel-fuzz-unit-');
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('the fuzz inputs', () => {
  it('start from uploads that are accepted as they are', async () => {
    for (const base of baseUploads()) {
      const r = await ingestToMemory(writeUpload(dir, base.files));
      expect(acceptedProblem(r), base.label).toBeNull();
      expect(r.summary.frames, base.label).toBe(60);
      expect(r.summary.gaps, base.label).toBe(0);
    }
  });

  it('are a pure function of the seed', () => {
    const bytes = (seed: number) => Buffer.concat(makeCase(seed).files.flatMap((f) => [Buffer.from(f.name), f.content]));
    expect(bytes(17).equals(bytes(17))).toBe(true);
    expect(describeCase(makeCase(17))).toBe(describeCase(makeCase(17)));
    expect(bytes(17).equals(bytes(18))).toBe(false);
    const r = rngFrom(5);
    const xs = Array.from({ length: 1000 }, r);
    expect(Math.min(...xs)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...xs)).toBeLessThan(1);
  });

  it('use every kind of damage', () => {
    const seen = new Set<string>();
    for (let s = 0; s < 600; s++) for (const k of makeCase(s).kinds) seen.add(k);
    expect([...seen].sort()).toEqual([...MUTATION_KINDS].sort());
  });
});

describe(`${CASES} mutated uploads through the parser`, () => {
  it('each is accepted consistently or refused with a clear message; none crashes or hangs', async () => {
    const run = await runParserFuzz({ firstSeed: FIRST_SEED, cases: CASES, timeoutMs: 5000 });
    console.log(
      `[ingest-fuzz] seeds ${FIRST_SEED}..${FIRST_SEED + CASES - 1}: ` +
        Object.entries(run.counts)
          .map(([k, n]) => `${k} ${n}`)
          .join(', ') +
        `; refusals by code: ${JSON.stringify(run.codes)}`,
    );
    expect(run.outcomes).toHaveLength(CASES);
    expect(run.bugs.map((b) => `${b.kind}: ${b.message}\n  ${b.what ?? `seed ${b.seed}`}`)).toEqual([]);
    // Both ways out are exercised: mutations that a file survives, and ones it does not.
    expect(run.counts.accepted).toBeGreaterThan(CASES / 50);
    expect(run.counts.refused).toBeGreaterThan(CASES / 2);
  }, 180_000);
});

describe('regressions found by the fuzzer', () => {
  const s = tarrowSeries(30, 30, 1_767_225_600);

  it('a .cff whose DAT section lost its first 59 samples (a swapped section line) is refused, not stored as one row', async () => {
    // seed 1004534 of the route fuzz: the "--- file type: DAT" line swapped with the last sample
    const c = makeCase(1_004_534);
    expect(describeCase(c)).toBe('seed 1004534 (single-file .cff (ASCII, 60 frames/s)): moorgate.cff: swap lines 21 and 80');
    const out = await runParserCase(c, dir, 5000);
    expect(out).toMatchObject({ kind: 'refused', code: 'BAD_FILE' });
    expect(out.message).toMatch(/: the first sample is numbered 60, but the data of .+ start at sample 1; is the data file cut at the front\?$/);
  });

  it('a quote in the middle of a CSV field is a BAD_FILE refusal (csv-parse code without the CSV_ prefix)', async () => {
    const lines = csvText(s).split('\n');
    lines[4] = lines[4].replace(/^(\d+)/, '$1"x');
    expect(await refusal(dir, [{ name: 'quote.csv', content: lines.join('\n') }])).toEqual({
      code: 'BAD_FILE',
      message: 'line 5: a quote in the middle of a field (quote the whole field, or remove the quote)',
    });
  });

  const cfgOf = (a: string) =>
    [
      'Tarrow Moorgate PMU,MG-1,1999',
      '1,1A,0D',
      `1,moorgate.freq,,,Hz,${a},60,0,-32767,32767,1,1,P`,
      '60',
      '1',
      '30,3',
      '01/01/2026,00:00:00.000000',
      '01/01/2026,00:00:00.000000',
      'ASCII',
      '1',
      '',
    ].join('\r\n');
  const dat = '1,0,10\r\n2,33333,\r\n3,66667,12\r\n';

  it('a COMTRADE multiplier that overflows to infinity is refused, not stored as Infinity', async () => {
    expect(await refusal(dir, [{ name: 'big.cfg', content: cfgOf('1e400') }, { name: 'big.dat', content: dat }])).toEqual({
      code: 'BAD_FILE',
      message: "big.cfg line 3: analog channel 1 multiplier a '1e400' is out of range",
    });
    expect(
      await refusal(dir, [
        { name: 'huge.cfg', content: cfgOf('1e305') },
        { name: 'huge.dat', content: '1,0,10\r\n2,33333,99998\r\n3,66667,12\r\n' },
      ]),
    ).toEqual({
      code: 'BAD_FILE',
      message: "huge.dat line 2: analog channel 1 'moorgate.freq': raw value 99998 scaled by a = 1e+305, b = 60 is out of range",
    });
  });

  it('an empty ASCII .dat cell is still a dropout (NaN), not an overflow', async () => {
    const r = await ingestToMemory(writeUpload(dir, [{ name: 'gap.cfg', content: cfgOf('0.001') }, { name: 'gap.dat', content: dat }]));
    expect(Array.from(r.series['moorgate.freq'])).toEqual([60.01, NaN, 60.012]);
  });

  it('a COMTRADE pair refused for its columns leaves no file stream to fail after the files are deleted', async () => {
    const uncaught: unknown[] = [];
    const onUncaught = (e: unknown) => uncaught.push(e);
    process.on('uncaughtException', onUncaught);
    try {
      for (let k = 0; k < 20; k++) {
        const files = writeUpload(dir, [
          { name: `odd-${k}.cfg`, content: cfgOf('0.001').replace('moorgate.freq', 'no-such.freq') },
          { name: `odd-${k}.dat`, content: dat },
        ]);
        // What the upload route does: prepare (open + map columns), refuse, delete the spool files.
        const err = await ingestToMemory(files).catch((e: unknown) => e);
        expect(err).toBeInstanceOf(UnmappedColumnsError);
        for (const f of files) fs.rmSync(f.path);
      }
      await new Promise((r) => setTimeout(r, 200));
    } finally {
      process.off('uncaughtException', onUncaught);
    }
    expect(uncaught).toEqual([]);
  });

  it('a whole number too large for a double is refused as out of range', async () => {
    const err = await ingestToMemory(
      writeUpload(dir, [
        { name: 'n.cfg', content: cfgOf('0.001').replace('\r\n1\r\n30,3', `\r\n${'9'.repeat(30)}\r\n30,3`) },
        { name: 'n.dat', content: dat },
      ]),
    ).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(FileRefusedError);
    expect((err as Error).message).toBe(`n.cfg line 5: number of sampling rates nrates '${'9'.repeat(30)}' is out of range`);
  });
});
