// Child process of the parser fuzz (tests/fuzz/parser-driver.ts): runs cases seed..seed+count−1
// one after the other and prints one JSON line per case. Running in a child lets the driver kill
// a case that blocks the event loop (a synchronous endless loop), which no in-process timer can.
//   tsx tests/fuzz/parser-child.ts <firstSeed> <count> <timeoutMs> <dir>
import { runParserSeed } from './parser-case';

async function main(): Promise<void> {
  const [first, count, timeoutMs, dir] = process.argv.slice(2);
  const from = Number(first);
  const n = Number(count);
  for (let seed = from; seed < from + n; seed++) {
    // announce the case first: if it never answers, the driver knows which one hung
    process.stdout.write(`${JSON.stringify({ start: seed })}\n`);
    const outcome = await runParserSeed(seed, dir, Number(timeoutMs));
    process.stdout.write(`${JSON.stringify(outcome)}\n`);
  }
}

main().then(
  () => process.exit(0),
  (err: unknown) => {
    process.stderr.write(`${(err as Error)?.stack ?? String(err)}\n`);
    process.exit(1);
  },
);
