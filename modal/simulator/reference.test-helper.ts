// Runs tests/reference/sim_reference.py (numpy/scipy from Debian) once with every case of a test
// file. Test-only helper (Node imports are fine here; it is never bundled).
import { spawnSync } from 'node:child_process';
import path from 'node:path';

export const PYTHON = '/usr/bin/python3';
const SCRIPT = path.resolve(__dirname, '../../tests/reference/sim_reference.py');

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function runReference(cases: Record<string, unknown>[]): any[] {
  const res = spawnSync(PYTHON, [SCRIPT], { input: JSON.stringify({ cases }), encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  if (res.status !== 0) throw new Error(`sim_reference.py failed: ${res.stderr}`);
  return JSON.parse(res.stdout).results;
}
