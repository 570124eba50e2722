// Runs tests/reference/modal_ref.py once with all of a test file's cases (Debian's numpy/scipy,
// called by its full path as CHECKS.md §2 asks). Test-only helper: Node imports are fine here.
import { spawnSync } from 'node:child_process';
import path from 'node:path';

export const PYTHON = '/usr/bin/python3';
const SCRIPT = path.resolve(__dirname, 'modal_ref.py');

export interface ReferenceReply<R = Record<string, unknown>> {
  results: R[];
  versions: { numpy: string; scipy: string };
}

/** Converts typed arrays to plain arrays so JSON carries them as lists. */
function toJson(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (ArrayBuffer.isView(v) ? Array.from(v as Float64Array) : v));
}

export function runReference<R = Record<string, unknown>>(cases: Record<string, unknown>[]): ReferenceReply<R> {
  const run = spawnSync(PYTHON, [SCRIPT], { input: toJson({ cases }), encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  if (run.error) throw run.error;
  if (run.status !== 0) throw new Error(`${SCRIPT} failed (${run.status}): ${run.stderr}`);
  return JSON.parse(run.stdout) as ReferenceReply<R>;
}

/** Pairs two multisets of complex numbers greedily by distance; returns the largest distance. */
export function maxPairedDistance(a: { re: number; im: number }[], b: [number, number][]): number {
  if (a.length !== b.length) return Infinity;
  const left = b.map(([re, im]) => ({ re, im }));
  let worst = 0;
  for (const z of a) {
    let best = 0;
    let bestD = Infinity;
    left.forEach((w, i) => {
      const d = Math.hypot(z.re - w.re, z.im - w.im);
      if (d < bestD) {
        bestD = d;
        best = i;
      }
    });
    worst = Math.max(worst, bestD);
    left.splice(best, 1);
  }
  return worst;
}
