// `npm run bench:ingest`: one hour of 30 frames/s data for 20 Tarrow channels (~30 MB of CSV, the
// file of ./ingest-speed.ts) uploaded THROUGH THE HTTP API to a running server, as the Recordings
// screen does it (multipart POST /api/recordings, signed in as the demo engineer): the server
// spools it and answers 202, the worker's ingest job parses, checks and stores it in one
// transaction. Prints the time to the answer, the time until the recording is ready (its ingest
// analysis done), and the peak memory (VmHWM from /proc/<pid>/status) of the server and of the
// worker process, against the targets: ready ≤ 10 s, each process ≤ 300 MB.
//
// The stack: the bootstrap of `npm test` with a DURABLE PostgreSQL (fsync on, as in production),
// Redis, the server (NODE_ENV=production) and one worker with the automatic scan off
// (KEEL_AUTO_SCAN=0), so nothing but the ingest runs.
//
//   npm run bench:ingest -- [--minutes 60] [--channels 20] [--rate 30] [--runs 1] [--keep]
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../../db/seed';
import { freePort, loadLine, procStatusMb, scriptPid, signIn, spawnProc, stackEnv, startBenchServices, startServer, waitFor } from './bench-stack';
import { writeCsv } from './ingest-speed';

const { values: args } = parseArgs({
  options: { minutes: { type: 'string' }, channels: { type: 'string' }, rate: { type: 'string' }, runs: { type: 'string' }, keep: { type: 'boolean' } },
});

const TARGET_SECONDS = 10;
const TARGET_MB = 300;

async function main() {
  const minutes = args.minutes ? Number(args.minutes) : 60;
  const nChannels = args.channels ? Number(args.channels) : 20;
  const rate = args.rate ? Number(args.rate) : 30;
  const runs = args.runs ? Number(args.runs) : 1;
  console.log(`bench:ingest — ${loadLine()}`);
  const svc = await startBenchServices({ durable: true, keep: args.keep });
  let server: Awaited<ReturnType<typeof startServer>> | null = null;
  let worker: ReturnType<typeof spawnProc> | null = null;
  try {
    const port = await freePort();
    const spool = path.join(svc.work, 'spool');
    const env = stackEnv({
      databaseUrl: svc.databaseUrl,
      redisUrl: svc.redisUrl,
      port,
      prefix: `keel-bench-ingest-${process.pid}`,
      extra: { KEEL_SPOOL_DIR: spool, KEEL_AUTO_SCAN: '0' },
    });
    server = await startServer(env);
    worker = spawnProc('jobs/worker.ts', env, 'worker');
    const base = `http://127.0.0.1:${port}`;
    await waitFor(async () => ((await (await fetch(`${base}/api/health`)).json()) as { workers?: number }).workers === 1, 'the worker', 90_000);
    const serverPid = scriptPid(server.child.pid!);
    const workerPid = scriptPid(worker.child.pid!);
    const idle = { server: procStatusMb(serverPid, 'VmHWM'), worker: procStatusMb(workerPid, 'VmHWM') };

    const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;
    const { cookie, csrf } = await signIn(base, engineer.email, DEMO_PASSWORD);
    const results: { answer: number; ready: number; sizeMb: number; rows: number }[] = [];
    const file = path.join(svc.work, 'bench.csv');
    const rows = writeCsv(file, minutes, nChannels, rate);
    for (let run = 0; run < runs; run++) {
      const sizeMb = fs.statSync(file).size / 1e6;
      const form = new FormData();
      form.append('file', await fs.openAsBlob(file, { type: 'text/csv' }), `tarrow-bench-${run}.csv`);
      const t0 = performance.now();
      const r = await fetch(`${base}/api/recordings`, { method: 'POST', headers: { cookie, 'x-csrf-token': csrf }, body: form });
      const answer = (performance.now() - t0) / 1000;
      const text = await r.text();
      if (r.status !== 202 && r.status !== 201) throw new Error(`upload answered ${r.status}: ${text.slice(0, 400)}`);
      const id = (JSON.parse(text) as { recording: { id: number } }).recording.id;
      await waitFor(
        async () => {
          const g = (await (await fetch(`${base}/api/recordings/${id}`, { headers: { cookie } })).json()) as { recording: { status: string; error: string | null } };
          if (g.recording.status === 'failed') throw new Error(`ingest failed: ${g.recording.error}`);
          return g.recording.status === 'ready';
        },
        'the recording to be ready',
        600_000,
        50,
      );
      const ready = (performance.now() - t0) / 1000;
      results.push({ answer, ready, sizeMb, rows });
      // remove it again, so the next run's identical bytes are not refused as a duplicate
      const del = await fetch(`${base}/api/recordings/${id}`, { method: 'DELETE', headers: { cookie, 'x-csrf-token': csrf } });
      if (del.status !== 200) throw new Error(`deleting recording ${id} answered ${del.status}`);
    }
    fs.rmSync(file, { force: true });
    const peak = { server: procStatusMb(serverPid, 'VmHWM'), worker: procStatusMb(workerPid, 'VmHWM') };
    const best = results.reduce((a, b) => (b.ready < a.ready ? b : a));
    const pass = (ok: boolean) => (ok ? 'PASS' : 'FAIL');
    console.log(`\nfile: ${minutes} min × ${rate} frames/s × ${nChannels} channels = ${best.rows.toLocaleString('en')} rows, ${best.sizeMb.toFixed(1)} MB of CSV`);
    for (const [i, r] of results.entries()) {
      console.log(`run ${i + 1}: answered (202, spooled) after ${r.answer.toFixed(2)} s; ready after ${r.ready.toFixed(2)} s (${(r.sizeMb / r.ready).toFixed(1)} MB/s end to end)`);
    }
    console.log('');
    console.log(`${'figure'.padEnd(34)} ${'measured'.padStart(10)} ${'target'.padStart(10)}  result`);
    console.log(`${'time to ingested (best run)'.padEnd(34)} ${`${best.ready.toFixed(2)} s`.padStart(10)} ${`≤ ${TARGET_SECONDS} s`.padStart(10)}  ${pass(best.ready <= TARGET_SECONDS)}`);
    for (const p of ['server', 'worker'] as const) {
      const mb = peak[p];
      console.log(
        `${`${p} peak memory (VmHWM)`.padEnd(34)} ${`${mb?.toFixed(0) ?? '?'} MB`.padStart(10)} ${`≤ ${TARGET_MB} MB`.padStart(10)}  ${mb === null ? '?' : pass(mb <= TARGET_MB)}   (idle before: ${idle[p]?.toFixed(0) ?? '?'} MB)`,
      );
    }
    console.log(`\n${loadLine()}; PostgreSQL with fsync on`);
  } finally {
    await worker?.stop();
    await server?.stop();
    await svc.stop();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
