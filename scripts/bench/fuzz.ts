// The long run of the upload fuzz (tests/fuzz/): ≥ 5,000 seeded mutations of valid CSV and
// COMTRADE uploads through the ingest parser, each with a time limit enforced from outside the
// process that runs it. Prints counts by outcome, refusal codes, the most common refusal reasons
// and every case that crashed, hung or was handled wrongly (replay one with makeCase(seed)).
// Exits 1 when any case was a bug.
//   npm run bench:fuzz -- [--cases 5000] [--seed 1] [--timeout-ms 5000]
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
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(err);
    process.exit(1);
  },
);
