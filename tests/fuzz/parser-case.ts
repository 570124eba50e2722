// One fuzz case through the ingest parser (no database): the mutated upload is written to a
// folder under neutral names, read, checked and aligned into memory. Outcomes:
//   accepted     the file went through and what came out is self-consistent
//   refused      an ingest refusal (BAD_FILE, UNMAPPED_COLUMNS, BAD_MAPPING) with a clear message
//   crash        anything else was thrown (TypeError, RangeError, …): a bug
//   hang         no answer within the per-case time limit: a bug
//   bad-accept   accepted, but the result breaks an invariant: a bug
//   bad-refusal  refused, but without a usable message: a bug
import fs from 'node:fs';
import { STANDARD_REPORTING_RATES } from '../../modal/preprocess';
import { FileRefusedError, MappingError, UnmappedColumnsError } from '../../server/ingest/errors';
import { ingestToMemory, writeUpload, type MemoryIngest } from '../fixtures-bad/harness';
import { describeCase, makeCase, type FuzzCase } from './mutate';

export type OutcomeKind = 'accepted' | 'refused' | 'crash' | 'hang' | 'bad-accept' | 'bad-refusal';
export const BUG_OUTCOMES: readonly OutcomeKind[] = ['crash', 'hang', 'bad-accept', 'bad-refusal'];

export interface CaseOutcome {
  seed: number;
  kind: OutcomeKind;
  /** Refusal code (refused / bad-refusal) or error name (crash). */
  code?: string;
  /** The refusal or error message, or what invariant broke. */
  message?: string;
  /** The case, in words (for bugs). */
  what?: string;
}

const RATES = new Set<number>([...STANDARD_REPORTING_RATES[50], ...STANDARD_REPORTING_RATES[60]]);

/** Invariants of an accepted ingest; returns what is wrong, or null. */
export function acceptedProblem(r: MemoryIngest): string | null {
  const s = r.summary;
  if (!RATES.has(s.rate)) return `rate ${s.rate} is not a standard reporting rate`;
  if (s.rows < 2) return `only ${s.rows} row(s) kept`;
  if (s.frames !== s.rows + s.missingFrames) return `frames ${s.frames} ≠ rows ${s.rows} + missing ${s.missingFrames}`;
  if (!Number.isFinite(s.startTime) || !Number.isFinite(s.endTime)) return 'start or end time is not finite';
  if (Math.abs(s.endTime - (s.startTime + (s.frames - 1) / s.rate)) > 1e-6) return `end time ${s.endTime} does not match start + (frames − 1) / rate`;
  if (s.channels.length === 0) return 'no channel stored';
  for (const ch of s.channels) {
    const v = r.series[ch.channel.name];
    if (!v || v.length !== s.frames) return `channel ${ch.channel.name}: ${v?.length ?? 0} values for ${s.frames} frames`;
    let present = 0;
    for (const x of v) {
      if (Number.isNaN(x)) continue;
      if (!Number.isFinite(x)) return `channel ${ch.channel.name}: an infinite value was stored`;
      present++;
    }
    if (present > s.rows) return `channel ${ch.channel.name}: ${present} values from ${s.rows} rows`;
    if (ch.quality.samples !== s.frames) return `channel ${ch.channel.name}: quality counts ${ch.quality.samples} samples of ${s.frames}`;
  }
  return null;
}

function refusalProblem(err: { message?: unknown; reason?: unknown }): string | null {
  const m = typeof err.message === 'string' ? err.message.trim() : '';
  if (m.length < 8) return `message too short: ${JSON.stringify(err.message)}`;
  if (/undefined|\[object Object\]/.test(m)) return `message has a programming artefact: ${m}`;
  if (err instanceof FileRefusedError && !String(err.reason).trim()) return 'no reason given';
  return null;
}

function withTimeout<T>(p: Promise<T>, ms: number): Promise<T | typeof TIMED_OUT> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([p, new Promise<typeof TIMED_OUT>((resolve) => (timer = setTimeout(() => resolve(TIMED_OUT), ms)))]).finally(() =>
    clearTimeout(timer),
  );
}
const TIMED_OUT = Symbol('timed out');

export async function runParserCase(c: FuzzCase, dir: string, timeoutMs: number): Promise<CaseOutcome> {
  const upload = writeUpload(dir, c.files);
  const seed = c.seed;
  try {
    const got = await withTimeout(ingestToMemory(upload), timeoutMs);
    if (got === TIMED_OUT) return { seed, kind: 'hang', message: `no answer within ${timeoutMs} ms`, what: describeCase(c) };
    const problem = acceptedProblem(got);
    return problem ? { seed, kind: 'bad-accept', message: problem, what: describeCase(c) } : { seed, kind: 'accepted' };
  } catch (err) {
    const e = err as Error & { code?: string; reason?: string };
    if (err instanceof FileRefusedError || err instanceof UnmappedColumnsError || err instanceof MappingError) {
      const problem = refusalProblem(e);
      if (problem) return { seed, kind: 'bad-refusal', code: e.code, message: problem, what: describeCase(c) };
      return { seed, kind: 'refused', code: e.code, message: e.message };
    }
    return { seed, kind: 'crash', code: e?.name ?? typeof err, message: `${e?.message ?? String(err)}\n${(e?.stack ?? '').split('\n').slice(1, 6).join('\n')}`, what: describeCase(c) };
  } finally {
    for (const f of upload) fs.rmSync(f.path, { force: true });
  }
}

export async function runParserSeed(seed: number, dir: string, timeoutMs: number): Promise<CaseOutcome> {
  return runParserCase(makeCase(seed), dir, timeoutMs);
}
