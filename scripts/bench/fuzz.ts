// The long run of the upload fuzz (tests/fuzz/): ≥ 5,000 seeded mutations of valid CSV and
// COMTRADE uploads through the ingest parser, each with a time limit enforced from outside the
// process that runs it. Prints counts by outcome, refusal codes, the most common refusal reasons
// and every case that crashed, hung or was handled wrongly (replay one with makeCase(seed)).
// Then the same number of cases (other seeds) through the upload route of a real server: the
// route-fuzz test of tests/integration/upload-robustness.test.ts, run through `npm test`'s
// bootstrap with KEEL_UPLOAD_FUZZ_CASES (every answer 201 or 400/409/413 with a reason agreeing
// with the parser, refusals change no table, the server never restarts).
// Exits 1 when any case was a bug.
//   npm run bench:fuzz -- [--cases 5000] [--seed 1] [--timeout-ms 5000] [--route-cases N (default: --cases; 0 skips)]
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { runParserFuzz } from '../../tests/fuzz/parser-driver';

const args = process.argv.slice(2);
const opt = (name: string, def: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : def;
};

async function main(): Promise<number> {
  const cases = opt('cases', 5000);
  const firstSeed = opt('seed', 1);
  const timeoutMs = opt('timeout-ms', 5000);
  console.log(`[bench:fuzz] ${cases} cases from seed ${firstSeed}, ${timeoutMs} ms per case`);
  const t0 = performance.now();
  let shown = 0;
  const run = await runParserFuzz({
    firstSeed,
    cases,
    timeoutMs,
    onProgress: (done) => {
      if (done - shown >= 1000) {
        shown = done;
        console.log(`[bench:fuzz]   ${done} / ${cases}`);
      }
    },
  });
  const seconds = (performance.now() - t0) / 1000;

  console.log('\noutcome        cases');
  for (const [kind, n] of Object.entries(run.counts)) console.log(`${kind.padEnd(14)} ${String(n).padStart(6)}`);
  console.log('\nrefusals by code');
  for (const [code, n] of Object.entries(run.codes).sort((a, b) => b[1] - a[1])) console.log(`${code.padEnd(18)} ${String(n).padStart(6)}`);

  // Reasons with their locations and quoted values taken out, so that alike refusals count together.
  const reasons = new Map<string, number>();
  for (const o of run.outcomes) {
    if (o.kind !== 'refused' || !o.message) continue;
    const r = o.message
      .replace(/^[^:]*(line|record) \d+( \(byte \d+\))?: /, '')
      .replace(/'[^']*'|"[^"]*"/g, '…')
      .replace(/(?<![A-Za-z-])-?\d+(\.\d+)?(e[+-]?\d+)?/gi, 'N')
      .slice(0, 100);
    reasons.set(r, (reasons.get(r) ?? 0) + 1);
  }
  console.log(`\nmost common refusal reasons (${reasons.size} distinct)`);
  for (const [r, n] of [...reasons].sort((a, b) => b[1] - a[1]).slice(0, 15)) console.log(`${String(n).padStart(6)}  ${r}`);

  console.log(`\n${run.outcomes.length} cases in ${seconds.toFixed(1)} s (${((seconds * 1000) / run.outcomes.length).toFixed(1)} ms per case, one process)`);
  if (run.bugs.length) {
    console.log(`\n${run.bugs.length} case(s) handled wrongly:`);
    for (const b of run.bugs) console.log(`- ${b.kind}: ${b.message}\n    ${b.what ?? `seed ${b.seed}`}`);
    return 1;
  }
  console.log('no crash, no hang, no inconsistent acceptance, no refusal without a clear message');
  return routeFuzz(opt('route-cases', cases));
}

function routeFuzz(cases: number): number {
  if (cases <= 0) return 0;
  console.log(`\n[bench:fuzz] ${cases} cases through the upload route (a server on a throwaway PostgreSQL and Redis)…`);
  const t0 = performance.now();
  const root = path.resolve(__dirname, '..', '..');
  const r = spawnSync(process.execPath, ['scripts/test.mjs', '--no-typecheck', 'tests/integration/upload-robustness.test.ts', '-t', 'mutated uploads through the upload route'], {
    cwd: root,
    env: { ...process.env, KEEL_UPLOAD_FUZZ_CASES: String(cases) },
    encoding: 'utf8',
    maxBuffer: 256 << 20,
  });
  const out = `${r.stdout}\n${r.stderr}`;
  const seconds = (performance.now() - t0) / 1000;
  const tally = out.split('\n').find((l) => l.includes('[upload-fuzz]'));
  const summary = out.split('\n').find((l) => l.startsWith('Tests: '));
  console.log(tally ? tally.replace(/\x1b\[[0-9;]*m/g, '').trim() : '(the route fuzz printed no tally)');
  console.log(`${summary ?? '(no test summary)'}; ${seconds.toFixed(0)} s with the bootstrap`);
  if (r.status !== 0) {
    console.log(out.split('\n').slice(-60).join('\n'));
    console.log('the route fuzz FAILED (above)');
    return 1;
  }
  console.log('route: every answer 201 or 400/409/413 with a reason agreeing with the parser; refusals changed nothing; no 5xx, no restart');
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err);
    process.exit(1);
  },
);
