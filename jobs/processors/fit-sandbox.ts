// Sandboxed entry of the ring-down fit job (a child process per BullMQ's file-path processors).
import type { SandboxedJob } from 'bullmq';
import { analysisContext } from './analysis-context';
import { runFit } from './fit';

process.on('disconnect', () => process.exit(0));

export default async function fitProcessor(job: SandboxedJob) {
  return runFit(analysisContext(), job);
}
