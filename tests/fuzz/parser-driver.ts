// Runs the parser fuzz in a child process with a watchdog: each case has `timeoutMs` inside the
// child (a promise that never settles) and twice that from the driver (the child's event loop
// blocked); a hung child is killed, the case recorded as a hang, and a new child carries on with
// the next seed. Used by tests/unit/ingest-fuzz.test.ts and scripts/bench/fuzz.ts.
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import readline from 'node:readline';
import { BUG_OUTCOMES, type CaseOutcome, type OutcomeKind } from './parser-case';

const ROOT = path.resolve(__dirname, '..', '..');
const TSX = path.join(ROOT, 'node_modules', '.bin', 'tsx');
const CHILD = path.join(__dirname, 'parser-child.ts');
/** Start-up of a child (tsx compiling the parser) is not part of any case's time. */
const STARTUP_MS = 60_000;

export interface FuzzRun {
  outcomes: CaseOutcome[];
  counts: Record<OutcomeKind, number>;
  /** Refusal codes and how often each came. */
  codes: Record<string, number>;
  bugs: CaseOutcome[];
}

/** One child from `first` on; resolves with the outcomes it gave and whether it hung. */
function runChild(
  first: number,
  count: number,
  timeoutMs: number,
  dir: string,
  onOutcome: (o: CaseOutcome) => void,
): Promise<{ hungAt: number | null; diedAt: number | null }> {
  return new Promise((resolve, reject) => {
    const child = spawn(TSX, [CHILD, String(first), String(count), String(timeoutMs), dir], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    let current: number | null = null;
    let started = false;
    let watchdog: NodeJS.Timeout | undefined;
    let hungAt: number | null = null;
    let stderr = '';
    const arm = (ms: number) => {
      clearTimeout(watchdog);
      watchdog = setTimeout(() => {
        hungAt = current ?? first;
        child.kill('SIGKILL');
      }, ms);
    };
    arm(STARTUP_MS);
    child.stderr.on('data', (d: Buffer) => (stderr = (stderr + d.toString()).slice(-4000)));
    readline.createInterface({ input: child.stdout }).on('line', (line) => {
      let msg: { start?: number } & Partial<CaseOutcome>;
      try {
        msg = JSON.parse(line);
      } catch {
        return; // a stray line (a warning printed by a library)
      }
      if (typeof msg.start === 'number') {
        current = msg.start;
        started = true;
        arm(timeoutMs * 2 + 1000);
      } else if (typeof msg.seed === 'number' && msg.kind) {
        onOutcome(msg as CaseOutcome);
        current = null;
        arm(timeoutMs * 2 + 1000);
      }
    });
    child.on('exit', (code, signal) => {
      clearTimeout(watchdog);
      if (hungAt !== null) resolve({ hungAt, diedAt: null });
      else if (code === 0) resolve({ hungAt: null, diedAt: null });
      else if (started && current !== null) {
        // the child died inside a case (out of memory, a native crash): that case is a crash
        onOutcome({ seed: current, kind: 'crash', code: `exit ${code ?? signal}`, message: stderr.trim().split('\n').slice(-5).join('\n') });
        resolve({ hungAt: null, diedAt: current });
      } else reject(new Error(`fuzz child exited with ${code ?? signal}: ${stderr}`));
    });
  });
}

export async function runParserFuzz(opts: { firstSeed: number; cases: number; timeoutMs?: number; onProgress?: (done: number) => void }): Promise<FuzzRun> {
  const timeoutMs = opts.timeoutMs ?? 5000;
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keel-fuzz-'));
  const outcomes: CaseOutcome[] = [];
  const end = opts.firstSeed + opts.cases;
  try {
    let next = opts.firstSeed;
    while (next < end) {
      const { hungAt, diedAt } = await runChild(next, end - next, timeoutMs, dir, (o) => {
        outcomes.push(o);
        opts.onProgress?.(outcomes.length);
      });
      if (hungAt !== null) {
        outcomes.push({ seed: hungAt, kind: 'hang', message: `the child process did not answer within ${timeoutMs * 2 + 1000} ms (event loop blocked?)` });
        next = hungAt + 1;
      } else if (diedAt !== null) {
        next = diedAt + 1;
      } else {
        next = end;
      }
    }
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
  const counts = { accepted: 0, refused: 0, crash: 0, hang: 0, 'bad-accept': 0, 'bad-refusal': 0 } as Record<OutcomeKind, number>;
  const codes: Record<string, number> = {};
  for (const o of outcomes) {
    counts[o.kind]++;
    if (o.kind === 'refused' && o.code) codes[o.code] = (codes[o.code] ?? 0) + 1;
  }
  return { outcomes, counts, codes, bugs: outcomes.filter((o) => BUG_OUTCOMES.includes(o.kind)) };
}
