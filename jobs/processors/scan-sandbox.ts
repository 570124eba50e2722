// Sandboxed entry of the scan job: BullMQ runs this file in a child process (the worker passes its
// path), so the estimator's CPU work never blocks the worker's event loop.
import type { SandboxedJob } from 'bullmq';
import { analysisContext } from './analysis-context';
import { runScan } from './scan';

// If the worker dies, the IPC channel closes: stop at once rather than scan on as an orphan (the
// job is taken over by the next worker, which skips the windows already stored).
process.on('disconnect', () => process.exit(0));

export default async function scanProcessor(job: SandboxedJob) {
  return runScan(analysisContext(), job);
}
