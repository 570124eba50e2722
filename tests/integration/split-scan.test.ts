// A long scan shared by two worker processes: the whole-scan job splits the recording's windows
// into blocks (KEEL_SCAN_BLOCK_SECONDS, here 10 minutes of window starts), both workers take
// blocks, and the result has every window of the grid exactly once, each with its estimates.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { ambientRecord, csvOf, uploadReady } from './analysis-helpers';

const MINUTES = 90;
const START = Date.UTC(2025, 6, 1, 0, 0, 0) / 1000;
const EXPECTED = (MINUTES * 60 - 1200) / 60 + 1; // 20-minute windows every minute: 71
const BLOCK_SECONDS = 600; // 10 windows per block: 8 blocks

let stack: Stack;
let engineer: Client;

beforeAll(async () => {
  stack = await startStack({ env: { KEEL_SCAN_BLOCK_SECONDS: String(BLOCK_SECONDS) } });
  await stack.addWorker();
  await waitFor(async () => {
    const r = await fetch(`${stack.baseUrl}/api/health`);
    return ((await r.json()) as { workers?: number }).workers === 2;
  }, 'two live workers', 60_000);
  engineer = createClient(stack.baseUrl);
  await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
}, 120_000);

afterAll(async () => {
  await stack?.stop();
});

describe('a scan split into blocks', () => {
  it('is shared by two workers and stores every window exactly once', async () => {
    const { record } = ambientRecord(1500, { minutes: MINUTES, seed: 91, start: START });
    const rec = await uploadReady(stack, engineer, 'tarrow-90min-split.csv', csvOf(record), 180_000);
    const scan = await waitFor(async () => {
      const r = await engineer.get(`/api/analyses?recording=${rec}&kind=scan`);
      const a = r.body.analyses[0];
      return a && (a.status === 'done' || a.status === 'failed') ? a : undefined;
    }, 'the automatic scan to finish', 300_000);
    expect(scan.error).toBeNull();
    expect(scan.status).toBe('done');
    expect(scan.progress).toBe(1);
    expect(scan.windows).toBe(EXPECTED);

    const starts = (
      await stack.pool.query('select extract(epoch from start_time)::float8 as s from scan_windows where analysis_id = $1 order by start_time', [scan.id])
    ).rows.map((r) => Number(r.s));
    expect(starts).toEqual(Array.from({ length: EXPECTED }, (_, k) => START + 60 * k));
    const empty = await stack.pool.query(
      'select count(*)::int as n from scan_windows w where w.analysis_id = $1 and not exists (select 1 from mode_estimates e where e.window_id = w.id)',
      [scan.id],
    );
    expect(empty.rows[0].n).toBe(0);

    // which worker process ran each block (their "job … done" lines, stack.logs by process)
    const blockRuns = new Map<number, string[]>();
    for (const line of stack.logs) {
      const m = /^\[(worker\d*)\] .*scan job scan-(\d+)-w(\d+) done/.exec(line);
      if (!m || Number(m[2]) !== scan.id) continue;
      blockRuns.set(Number(m[3]), [...(blockRuns.get(Number(m[3])) ?? []), m[1]]);
    }
    expect([...blockRuns.keys()].sort((a, b) => a - b)).toEqual([0, 10, 20, 30, 40, 50, 60, 70]);
    const workers = new Set([...blockRuns.values()].flat());
    expect(workers).toEqual(new Set(['worker', 'worker2']));

    console.log(
      `[split-scan] ${EXPECTED} windows in ${blockRuns.size} blocks: ${[...blockRuns].map(([b, w]) => `${b}→${w.join('+')}`).join(', ')}`,
    );
  });
});
