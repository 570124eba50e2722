// Keel's command line (DESIGN.md §5.6): runs the estimators on a PMU file and prints JSON, for
// batch work; also writes simulated Tarrow recordings. Run as `npm run --silent keel -- <command>`.
//
//   keel fit FILE --from S --to S [--method matrix-pencil|prony] [--channels a,b] [--order N]
//                 [--angle-reference NAME|none]
//   keel scan FILE [--window S] [--step S] [--channels a,b] [--method yule-walker|acf-matrix-pencil]
//   keel simulate --kind ambient|ringdown --transfer-mw P --seed K --out FILE
//                 [--minutes M] [--seconds S] [--event line-trip|generator-loss] [--pre-event S]
//                 [--format csv|comtrade] [--comtrade-type ascii|binary] [--time epoch|iso]
//                 [--rate 10|12|15|20|30|60] [--forced-hz F --forced-mw A --forced-site SITE]
//                 [--channels a,b] [--decimals N]
//
// FILE is CSV (.csv), COMTRADE (.cfg with its .dat beside it) or single-file COMTRADE (.cff).
// Times of --from/--to are seconds after the first sample. JSON goes to stdout; an error goes to
// stderr as one line `keel: <message>` with exit code 1 (bad input) or 2 (bad command line).
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { TARROW_ANGLE_REFERENCE } from '../fixtures/tarrow-network';
import { scanAmbient } from '../modal/ambient';
import { ModalInputError } from '../modal/errors';
import { parseCff, parseComtrade, parseCsvRecord, writeComtrade, writeCsv } from '../modal/formats';
import { angleDifferenceDeg } from '../modal/preprocess';
import { fitRingdown } from '../modal/ringdown';
import { buildTarrowModel, simulateAmbient, simulateRingdown, type TrueMode } from '../modal/simulator';
import type { SampledRecord } from '../modal/types';

class UsageError extends Error {
  readonly code = 'USAGE' as const;
}

const USAGE = `usage:
  keel fit FILE --from S --to S [--method matrix-pencil|prony] [--channels a,b] [--order N] [--angle-reference NAME|none]
  keel scan FILE [--window S] [--step S] [--channels a,b] [--method yule-walker|acf-matrix-pencil]
  keel simulate --kind ambient|ringdown --transfer-mw P --seed K --out FILE [--minutes M] [--seconds S]
                [--event line-trip|generator-loss] [--pre-event S] [--format csv|comtrade]
                [--comtrade-type ascii|binary] [--time epoch|iso] [--rate 30|60]
                [--forced-hz F --forced-mw A --forced-site SITE] [--channels a,b] [--decimals N]`;

// ---------------------------------------------------------------------------------------------
// Argument helpers

function numberArg(values: Record<string, unknown>, name: string, opts: { required?: boolean; integer?: boolean; min?: number } = {}): number | undefined {
  const raw = values[name];
  if (raw === undefined) {
    if (opts.required) throw new UsageError(`--${name} is required`);
    return undefined;
  }
  const text = String(raw);
  const v = Number(text);
  if (text.trim() === '' || !Number.isFinite(v)) throw new UsageError(`--${name} must be a number, got "${text}"`);
  if (opts.integer && !Number.isInteger(v)) throw new UsageError(`--${name} must be a whole number, got "${text}"`);
  if (opts.min !== undefined && v < opts.min) throw new UsageError(`--${name} must be at least ${opts.min}, got ${text}`);
  return v;
}

function listArg(values: Record<string, unknown>, name: string): string[] | undefined {
  const raw = values[name];
  if (raw === undefined) return undefined;
  const list = String(raw)
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
  if (list.length === 0) throw new UsageError(`--${name} must list at least one channel`);
  return list;
}

function choiceArg<T extends string>(values: Record<string, unknown>, name: string, choices: readonly T[], fallback: T): T {
  const raw = values[name];
  if (raw === undefined) return fallback;
  if (!choices.includes(raw as T)) throw new UsageError(`--${name} must be one of ${choices.join(', ')}, got "${String(raw)}"`);
  return raw as T;
}

function parse(argv: string[], options: NonNullable<NonNullable<Parameters<typeof parseArgs>[0]>['options']>): { values: Record<string, unknown>; positionals: string[] } {
  try {
    const r = parseArgs({ args: argv, options, allowPositionals: true, strict: true });
    return { values: r.values as Record<string, unknown>, positionals: r.positionals };
  } catch (e) {
    throw new UsageError((e as Error).message);
  }
}

// ---------------------------------------------------------------------------------------------
// Files

/** Reads a PMU file by its extension. */
export function readRecord(file: string): SampledRecord {
  if (!existsSync(file)) throw new ModalInputError(`${file}: no such file`);
  const ext = path.extname(file).toLowerCase();
  if (ext === '.csv') return withFile(file, () => parseCsvRecord(readFileSync(file, 'utf8')));
  if (ext === '.cff') return withFile(file, () => parseCff(new Uint8Array(readFileSync(file))));
  if (ext === '.cfg') {
    const base = file.slice(0, -4);
    const dat = [`${base}.dat`, `${base}.DAT`].find((f) => existsSync(f));
    if (!dat) throw new ModalInputError(`${file}: the COMTRADE data file ${path.basename(base)}.dat is not beside it`);
    return withFile(file, () => parseComtrade(readFileSync(file, 'utf8'), new Uint8Array(readFileSync(dat))));
  }
  throw new ModalInputError(`${file}: unknown file type "${ext || '(none)'}"; expected .csv, .cfg (COMTRADE, with its .dat) or .cff`);
}

function withFile<T>(file: string, fn: () => T): T {
  try {
    return fn();
  } catch (e) {
    if (e instanceof ModalInputError) throw new ModalInputError(`${path.basename(file)}: ${e.message}`);
    throw e;
  }
}

/**
 * Angle channels made relative to the reference PMU (unwrapped differences), the reference itself
 * dropped: absolute PMU angles turn with the system frequency and wrap, so ring-down fits use
 * relative angles (DESIGN.md §5.6 preprocessing).
 */
function relativeAngles(record: SampledRecord, reference: string | null): SampledRecord {
  if (reference === null) return record;
  const ref = record.channels.find((c) => c.name === reference);
  if (!ref) return record;
  return {
    ...record,
    channels: record.channels
      .filter((c) => c.name !== reference)
      .map((c) => (c.name.endsWith('.angle') ? { name: c.name, values: angleDifferenceDeg(c.values, ref.values) } : c)),
  };
}

// ---------------------------------------------------------------------------------------------
// Commands

function cmdFit(argv: string[]): unknown {
  const { values, positionals } = parse(argv, {
    from: { type: 'string' },
    to: { type: 'string' },
    method: { type: 'string' },
    channels: { type: 'string' },
    order: { type: 'string' },
    'angle-reference': { type: 'string' },
  });
  if (positionals.length !== 1) throw new UsageError('fit needs exactly one FILE');
  const from = numberArg(values, 'from', { required: true })!;
  const to = numberArg(values, 'to', { required: true })!;
  if (!(to > from)) throw new UsageError(`--to (${to}) must be after --from (${from})`);
  const method = choiceArg(values, 'method', ['matrix-pencil', 'prony'] as const, 'matrix-pencil');
  const order = numberArg(values, 'order', { integer: true, min: 1 });
  const refArg = values['angle-reference'] === undefined ? TARROW_ANGLE_REFERENCE : String(values['angle-reference']);
  const reference = refArg === 'none' ? null : refArg;
  const raw = readRecord(positionals[0]);
  if (reference !== null && values['angle-reference'] !== undefined && !raw.channels.some((c) => c.name === reference)) {
    throw new ModalInputError(`--angle-reference ${reference} is not a channel of ${path.basename(positionals[0])}`);
  }
  const record = relativeAngles(raw, reference);
  const channels = listArg(values, 'channels');
  const result = fitRingdown(record, { method, order, channels, fromSeconds: from, toSeconds: to });
  return {
    file: positionals[0],
    method: result.method,
    order: result.order,
    rate: result.rate,
    snrDb: result.snrDb,
    angleReference: raw.channels.some((c) => c.name === reference) ? reference : null,
    modes: result.modes.map((m) => ({
      frequencyHz: m.frequencyHz,
      dampingPercent: m.dampingPercent,
      energyShare: m.energyShare,
      channels: m.channels.map((c) => ({ channel: c.channel, amplitude: c.amplitude, phaseDeg: c.phaseDeg })),
    })),
  };
}

function cmdScan(argv: string[]): unknown {
  const { values, positionals } = parse(argv, {
    window: { type: 'string' },
    step: { type: 'string' },
    channels: { type: 'string' },
    method: { type: 'string' },
  });
  if (positionals.length !== 1) throw new UsageError('scan needs exactly one FILE');
  const windowSeconds = numberArg(values, 'window', { min: 1 });
  const stepSeconds = numberArg(values, 'step', { min: 1 });
  const method = values.method === undefined ? undefined : choiceArg(values, 'method', ['yule-walker', 'acf-matrix-pencil'] as const, 'yule-walker');
  const record = readRecord(positionals[0]);
  const windows = scanAmbient(record, { windowSeconds, stepSeconds, channels: listArg(values, 'channels') ?? null, method });
  return {
    file: positionals[0],
    windows: windows.map((w) => ({
      start: w.start,
      end: w.end,
      skipped: w.skipped,
      ...(w.reason !== undefined ? { reason: w.reason } : {}),
      modes: w.modes.map((m) => ({
        frequencyHz: m.frequencyHz,
        dampingPercent: m.dampingPercent,
        dampingCi: m.dampingCi,
        forced: m.forced,
        shape: m.shape.map((s) => ({ channel: s.channel, magnitude: s.magnitude, angleDeg: s.angleDeg })),
      })),
    })),
  };
}

function modeJson(m: TrueMode) {
  return {
    track: m.track,
    label: m.label,
    frequencyHz: m.frequencyHz,
    dampingPercent: m.dampingPercent,
    ...(m.track !== null ? { shape: m.shape } : {}),
  };
}

/** `keel simulate …` without the printing: writes the file(s), returns the JSON object. */
export function simulateCommand(argv: string[]): Record<string, unknown> {
  const { values, positionals } = parse(argv, {
    kind: { type: 'string' },
    minutes: { type: 'string' },
    seconds: { type: 'string' },
    'transfer-mw': { type: 'string' },
    seed: { type: 'string' },
    out: { type: 'string' },
    format: { type: 'string' },
    'comtrade-type': { type: 'string' },
    time: { type: 'string' },
    rate: { type: 'string' },
    event: { type: 'string' },
    'pre-event': { type: 'string' },
    'forced-hz': { type: 'string' },
    'forced-mw': { type: 'string' },
    'forced-site': { type: 'string' },
    channels: { type: 'string' },
    decimals: { type: 'string' },
  });
  if (positionals.length !== 0) throw new UsageError(`simulate takes no FILE argument (use --out), got "${positionals[0]}"`);
  if (values.kind === undefined) throw new UsageError('--kind is required (ambient or ringdown)');
  const kind = choiceArg(values, 'kind', ['ambient', 'ringdown'] as const, 'ambient');
  const transferMw = numberArg(values, 'transfer-mw', { required: true })!;
  const seed = numberArg(values, 'seed', { required: true, integer: true, min: 0 })!;
  if (values.out === undefined) throw new UsageError('--out is required');
  const format = choiceArg(values, 'format', ['csv', 'comtrade'] as const, 'csv');
  const comtradeType = choiceArg(values, 'comtrade-type', ['ascii', 'binary'] as const, 'ascii');
  const time = choiceArg(values, 'time', ['epoch', 'iso'] as const, 'epoch');
  const rate = numberArg(values, 'rate') ?? 30;
  const channels = listArg(values, 'channels');
  const decimals = numberArg(values, 'decimals', { integer: true, min: 0 });
  const model = buildTarrowModel(transferMw);
  let record: SampledRecord;
  let trueModes: TrueMode[];
  let extra: Record<string, unknown> = {};
  if (kind === 'ambient') {
    const minutes = numberArg(values, 'minutes', { required: true })!;
    const fHz = numberArg(values, 'forced-hz');
    const fMw = numberArg(values, 'forced-mw');
    const fSite = values['forced-site'] === undefined ? undefined : String(values['forced-site']);
    const anyForced = fHz !== undefined || fMw !== undefined || fSite !== undefined;
    if (anyForced && (fHz === undefined || fMw === undefined || fSite === undefined)) {
      throw new UsageError('a forced oscillation needs all of --forced-hz, --forced-mw and --forced-site');
    }
    const forced = anyForced ? { frequencyHz: fHz!, amplitude: fMw!, site: fSite! } : undefined;
    record = simulateAmbient(model, { minutes, seed, rate, forced, channels });
    trueModes = model.trueModes;
    if (forced) extra = { forced };
  } else {
    const event = choiceArg(values, 'event', ['line-trip', 'generator-loss'] as const, 'line-trip');
    const minutes = numberArg(values, 'minutes');
    const seconds = numberArg(values, 'seconds') ?? (minutes !== undefined ? minutes * 60 : 40);
    const preEventSeconds = numberArg(values, 'pre-event') ?? 5;
    const sim = simulateRingdown(model, { event, seconds, preEventSeconds, seed, rate, channels });
    record = sim.record;
    trueModes = sim.trueModes;
    extra = { event, eventTime: sim.eventTime, eventSecondsFromStart: preEventSeconds };
  }
  const out = String(values.out);
  const files: string[] = [];
  if (format === 'csv') {
    writeFileSync(out, writeCsv(record, { time, decimals }));
    files.push(out);
  } else {
    const base = /\.(cfg|dat)$/i.test(out) ? out.slice(0, -4) : out;
    const eventTime = typeof extra.eventTime === 'number' ? extra.eventTime : undefined;
    const f = writeComtrade(record, { fileType: comtradeType === 'binary' ? 'BINARY' : 'ASCII', triggerTime: eventTime });
    writeFileSync(`${base}.cfg`, f.cfg);
    writeFileSync(`${base}.dat`, f.dat);
    files.push(`${base}.cfg`, `${base}.dat`);
  }
  return {
    kind,
    transferMw,
    seed,
    rate: record.rate,
    startTime: record.startTime,
    samples: record.channels[0].values.length,
    channels: record.channels.map((c) => c.name),
    files,
    ...extra,
    trueModes: trueModes.map(modeJson),
  };
}

// ---------------------------------------------------------------------------------------------

export function main(argv: string[]): number {
  try {
    const [command, ...rest] = argv;
    let out: unknown;
    if (command === 'fit') out = cmdFit(rest);
    else if (command === 'scan') out = cmdScan(rest);
    else if (command === 'simulate') out = simulateCommand(rest);
    else if (command === undefined || command === '--help' || command === 'help') {
      process.stdout.write(`${USAGE}\n`);
      return command === undefined ? 2 : 0;
    } else throw new UsageError(`unknown command "${command}"; commands are fit, scan, simulate`);
    process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
    return 0;
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write(`keel: ${e.message}\n${USAGE}\n`);
      return 2;
    }
    if (e instanceof ModalInputError) {
      process.stderr.write(`keel: ${e.message}\n`);
      return 1;
    }
    process.stderr.write(`keel: internal error: ${(e as Error).stack ?? String(e)}\n`);
    return 3;
  }
}

if (require.main === module) {
  process.exitCode = main(process.argv.slice(2));
}
