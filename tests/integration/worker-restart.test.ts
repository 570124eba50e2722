// A worker killed in the middle of an ambient scan (SIGKILL of its whole process tree: the worker
// and its sandboxed scan process) and started again finishes the scan with every window stored
// exactly once: no duplicated and no missing window starts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { descendants } from '../helpers/processes';
import { startStack, type Stack } from '../helpers/stack';
import { ambientRecord, csvOf, uploadReady } from './analysis-helpers';

const MINUTES = 90;
const START = Date.UTC(2025, 5, 1, 0, 0, 0) / 1000;
const EXPECTED = (MINUTES * 60 - 1200) / 60 + 1; // 20-minute windows every minute: 71

let stack: Stack;
let engineer: Client;

async function windowCount(analysisId: number): Promise<number> {
  return (await stack.pool.query('select count(*)::int as n from scan_windows where analysis_id = $1', [analysisId])).rows[0].n;
}

beforeAll(async () => {
  stack = await startStack({ worker: false });
  engineer = createClient(stack.baseUrl);
  await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD);
}, 120_000);

afterAll(async () => {
  await stack?.stop();
});

describe('a worker killed mid-scan', () => {
  it('is replaced by a new one that finishes the scan without duplicated or missing windows', async () => {
    const first = await stack.addWorker();
    const { record } = ambientRecord(1800, { minutes: MINUTES, seed: 77, start: START, channels: undefined });
    const rec = await uploadReady(stack, engineer, 'tarrow-90min.csv', csvOf(record), 180_000);
    const scan = await waitFor(async () => {
      const r = await engineer.get(`/api/analyses?recording=${rec}&kind=scan`);
      return r.body.analyses[0];
    }, 'the automatic scan', 60_000);
    await waitFor(async () => (await windowCount(scan.id)) >= 5, 'the first windows', 120_000);

    // crash: SIGKILL the worker with its sandboxed child processes (all started by this test)
    const tree = [first.pid!, ...descendants(first.pid!)];
    for (const pid of tree.reverse()) {
      try {
        process.kill(pid, 'SIGKILL');
      } catch {
        /* already gone */
      }
    }
    const atKill = await windowCount(scan.id);
    await new Promise((r) => setTimeout(r, 1500));
    const afterKill = await windowCount(scan.id);
    expect(afterKill).toBe(atKill); // nothing runs on as an orphan
    expect(afterKill).toBeLessThan(EXPECTED); // killed mid-scan, not after it
    const state = await engineer.get(`/api/analyses/${scan.id}`);
    expect(state.body.analysis.status).toBe('running');

    await stack.addWorker();
    const done = await waitFor(
      async () => {
        const r = await engineer.get(`/api/analyses/${scan.id}`);
        return r.body.analysis.status === 'done' || r.body.analysis.status === 'failed' ? r.body.analysis : undefined;
      },
      'the scan to finish after the restart',
      150_000,
    );
    expect(done.status).toBe('done');
    expect(done.error).toBeNull();
    expect(done.progress).toBe(1);
    expect(done.windows).toBe(EXPECTED);

    const starts = (await stack.pool.query('select extract(epoch from start_time)::float8 as s from scan_windows where analysis_id = $1 order by start_time', [scan.id])).rows.map(
      (r) => Number(r.s),
    );
    expect(starts).toEqual(Array.from({ length: EXPECTED }, (_, k) => START + 60 * k));
    // every window (before and after the crash) has its estimates
    const empty = await stack.pool.query(
      'select count(*)::int as n from scan_windows w where w.analysis_id = $1 and not exists (select 1 from mode_estimates e where e.window_id = w.id)',
      [scan.id],
    );
    expect(empty.rows[0].n).toBe(0);
    console.log(`[worker-restart] killed after ${atKill} of ${EXPECTED} windows; the new worker stored the other ${EXPECTED - atKill}`);
  });
});
