// Helpers of the analysis integration tests (pipeline, alerts, fits, transfer study, worker
// restart): simulated Tarrow recordings as CSV, multipart upload, waiting for analyses, the live
// event stream. The simulator knows the true modes, so every recording is a known-answer test.
import http from 'node:http';
import { LIGHT_CHANNELS } from '../../scripts/seed-demo';
import { writeCsv } from '../../modal/formats/csv';
import { buildTarrowModel, simulateAmbient, type TarrowModel } from '../../modal/simulator';
import type { SampledRecord } from '../../modal/types';
import type { Client, HttpResult } from '../helpers/http';
import { waitFor } from '../helpers/fixtures';
import type { Stack } from '../helpers/stack';

export { LIGHT_CHANNELS };

/** Angle and flow channels only: enough for the tracks and corridors, half the data of all 22. */
export const TEST_CHANNELS = LIGHT_CHANNELS;

export function ambientRecord(transferMw: number, opts: { minutes: number; seed: number; start: number; channels?: string[] }): { model: TarrowModel; record: SampledRecord } {
  const model = buildTarrowModel(transferMw);
  const record = simulateAmbient(model, { minutes: opts.minutes, seed: opts.seed, startTime: opts.start, channels: opts.channels ?? TEST_CHANNELS });
  return { model, record };
}

export function csvOf(record: SampledRecord): string {
  return writeCsv(record, { decimals: 5 });
}

/** POSTs a multipart upload of one CSV file with the client's session and CSRF token. */
export async function uploadCsv(stack: Stack, client: Client, fileName: string, text: string): Promise<HttpResult> {
  const boundary = `----keel-test-${Math.random().toString(36).slice(2)}`;
  const body = Buffer.concat([
    Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: text/csv\r\n\r\n`),
    Buffer.from(text),
    Buffer.from(`\r\n--${boundary}--\r\n`),
  ]);
  const token = await client.fetchCsrf();
  const res = await fetch(`${stack.baseUrl}/api/recordings`, {
    method: 'POST',
    headers: { 'Content-Type': `multipart/form-data; boundary=${boundary}`, 'x-csrf-token': token, Cookie: client.cookieHeader() },
    body,
  });
  const t = await res.text();
  return { status: res.status, body: t && (res.headers.get('content-type') ?? '').includes('json') ? JSON.parse(t) : t, headers: res.headers };
}

/** Uploads and waits until the recording is ready (ingested within the request or by its job). */
export async function uploadReady(stack: Stack, client: Client, fileName: string, text: string, timeoutMs = 120_000): Promise<number> {
  const r = await uploadCsv(stack, client, fileName, text);
  if (r.status !== 201 && r.status !== 202) throw new Error(`upload of ${fileName} answered ${r.status}: ${JSON.stringify(r.body)}`);
  const id = (r.body as { recording: { id: number } }).recording.id;
  await waitFor(
    async () => {
      const g = await client.get(`/api/recordings/${id}`);
      if (g.body?.recording?.status === 'failed') throw new Error(`ingest of ${fileName} failed: ${g.body.recording.error}`);
      return g.body?.recording?.status === 'ready';
    },
    `recording ${id} ready`,
    timeoutMs,
  );
  return id;
}

export interface AnalysisView {
  id: number;
  kind: string;
  status: string;
  progress: number;
  error: string | null;
  windows: number | null;
  recordingId: number;
}

/** Waits for the analysis of a kind on a recording to end (done or failed) and returns it. */
export async function waitForAnalysis(client: Client, recordingId: number, kind: 'scan' | 'fit', timeoutMs = 180_000): Promise<AnalysisView> {
  return waitFor(
    async () => {
      const r = await client.get(`/api/analyses?recording=${recordingId}&kind=${kind}`);
      const a = (r.body?.analyses ?? [])[0] as AnalysisView | undefined;
      return a && (a.status === 'done' || a.status === 'failed') ? a : undefined;
    },
    `${kind} of recording ${recordingId}`,
    timeoutMs,
  );
}

/** Waits until the alert evaluation queue of the stack is idle after a scan (alerts settle). */
export async function settle(ms = 1500): Promise<void> {
  await new Promise((r) => setTimeout(r, ms));
}

export interface EventCollector {
  events: { type: string; data: any }[];
  close(): void;
}

/** Opens GET /api/events with the client's session and collects the messages. */
export function collectEvents(stack: Stack, client: Client): Promise<EventCollector> {
  return new Promise((resolve, reject) => {
    const events: { type: string; data: any }[] = [];
    const req = http.get(`${stack.baseUrl}/api/events`, { headers: { Cookie: client.cookieHeader(), Accept: 'text/event-stream' } }, (res) => {
      if (res.statusCode !== 200) {
        reject(new Error(`GET /api/events answered ${res.statusCode}`));
        return;
      }
      let buf = '';
      res.setEncoding('utf8');
      res.on('data', (d: string) => {
        buf += d;
        let i;
        while ((i = buf.indexOf('\n\n')) >= 0) {
          const block = buf.slice(0, i);
          buf = buf.slice(i + 2);
          const type = /^event: (.*)$/m.exec(block)?.[1];
          const data = /^data: (.*)$/m.exec(block)?.[1];
          if (type && data) events.push({ type, data: JSON.parse(data) });
        }
      });
      resolve({ events, close: () => req.destroy() });
    });
    req.on('error', (e) => (e.message.includes('socket hang up') ? undefined : reject(e)));
  });
}
