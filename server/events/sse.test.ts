// The SSE stream (WHATWG HTML server-sent events format: standard) served from a bare http server,
// with the bus on ioredis-mock.
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import RedisMock from 'ioredis-mock';
import type { Redis } from 'ioredis';
import { afterEach, describe, expect, it } from 'vitest';
import type { KeelEvent } from '../../shared/api/events';
import { createEventBus, eventChannel, type EventBus } from './bus';
import { formatSseMessage, streamEvents } from './sse';

let server: http.Server | null = null;
let theBus: EventBus | null = null;
const conns: Redis[] = [];
afterEach(async () => {
  await theBus?.close();
  for (const c of conns.splice(0)) c.disconnect();
  await new Promise<void>((r) => (server ? server.close(() => r()) : r()));
  server = null;
});

async function start(opts: Parameters<typeof streamEvents>[3] = {}): Promise<{ url: string; bus: EventBus }> {
  const mk = () => {
    const r = new RedisMock({ host: 'sse-test', port: 6391 }) as unknown as Redis;
    conns.push(r);
    return r;
  };
  const bus = createEventBus({ publisher: mk(), subscriber: mk(), channel: eventChannel('sse') });
  theBus = bus;
  server = http.createServer((req, res) => void streamEvents(req, res, bus, opts));
  await new Promise<void>((r) => server!.listen(0, '127.0.0.1', () => r()));
  return { url: `http://127.0.0.1:${(server!.address() as AddressInfo).port}/`, bus };
}

/** A raw client (node:http, so that leaving closes the socket at once). */
interface Client {
  status: number;
  headers: http.IncomingHttpHeaders;
  text(): string;
  /** Resolves when the text received so far satisfies `until`. */
  waitFor(until: (text: string) => boolean): Promise<string>;
  close(): void;
}
function connect(url: string): Promise<Client> {
  return new Promise((resolve, reject) => {
    const req = http.get(url, (res) => {
      let text = '';
      const waiters: { until: (t: string) => boolean; resolve: (t: string) => void }[] = [];
      res.setEncoding('utf8');
      res.on('data', (d: string) => {
        text += d;
        for (const w of [...waiters]) if (w.until(text)) (waiters.splice(waiters.indexOf(w), 1), w.resolve(text));
      });
      resolve({
        status: res.statusCode ?? 0,
        headers: res.headers,
        text: () => text,
        waitFor: (until) => (until(text) ? Promise.resolve(text) : new Promise((r) => waiters.push({ until, resolve: r }))),
        close: () => req.destroy(),
      });
    });
    req.on('error', (e) => (e.message.includes('socket hang up') ? undefined : reject(e)));
  });
}

const ev: KeelEvent = {
  type: 'analysis.progress',
  analysisId: 4,
  recordingId: 2,
  kind: 'scan',
  status: 'running',
  progress: 0.5,
  error: null,
  at: '2026-06-01T12:00:00.000Z',
};

describe('formatSseMessage', () => {
  it('writes id, event and one data line, ended by a blank line', () => {
    expect(formatSseMessage({ type: 'ready' })).toBe('event: ready\ndata: {"type":"ready"}\n\n');
    expect(formatSseMessage(ev, 3)).toBe(`id: 3\nevent: analysis.progress\ndata: ${JSON.stringify(ev)}\n\n`);
  });
});

describe('streamEvents', () => {
  it('answers text/event-stream, says ready, relays bus events and lets go when the client leaves', async () => {
    const { url, bus } = await start({ heartbeatMs: 50 });
    const c = await connect(url);
    expect(c.status).toBe(200);
    expect(c.headers['content-type']).toBe('text/event-stream; charset=utf-8');
    expect(c.headers['cache-control']).toBe('no-cache, no-transform');
    let text = await c.waitFor((t) => t.includes('event: ready'));
    expect(text.startsWith('retry: 5000\n\n')).toBe(true);
    expect(bus.listenerCount()).toBe(1);
    await bus.publish(ev);
    text = await c.waitFor((t) => t.includes('event: analysis.progress'));
    const block = text.split('\n\n').find((b) => b.includes('event: analysis.progress'))!;
    const data = block.split('\n').find((l) => l.startsWith('data: '))!.slice(6);
    expect(JSON.parse(data)).toEqual(ev);
    expect(block.startsWith('id: 1\n')).toBe(true);
    await c.waitFor((t) => t.includes(': keep-alive'));
    c.close();
    for (let i = 0; i < 50 && bus.listenerCount() > 0; i++) await new Promise((r) => setTimeout(r, 10));
    expect(bus.listenerCount()).toBe(0);
  });

  it('sends only what the filter lets through', async () => {
    const { url, bus } = await start({ filter: (e) => e.type !== 'analysis.progress' });
    const c = await connect(url);
    await c.waitFor((t) => t.includes('event: ready'));
    await bus.publish(ev);
    await bus.publish({ type: 'alert.cleared', alertId: 1, trackCode: 'east-west', trackName: 'East–west', kind: 'poor', level: 1, worstDamping: 2.5, at: '2026-06-01T13:00:00.000Z' });
    const text = await c.waitFor((t) => t.includes('event: alert.cleared'));
    expect(text).not.toContain('analysis.progress');
    c.close();
  });

  it('ends the stream once revalidate says the client may no longer listen, and only then', async () => {
    let allowed = true;
    let asked = 0;
    const { url, bus } = await start({
      revalidateMs: 30,
      revalidate: async () => {
        asked++;
        if (asked === 2) throw new Error('database away'); // an error keeps the stream open
        return allowed;
      },
    });
    const ended = new Promise<string>((resolve, reject) => {
      http
        .get(url, (res) => {
          let text = '';
          res.setEncoding('utf8');
          res.on('data', (d: string) => (text += d));
          res.on('end', () => resolve(text));
        })
        .on('error', reject);
    });
    for (let i = 0; i < 100 && asked < 4; i++) await new Promise((r) => setTimeout(r, 10));
    expect(asked).toBeGreaterThanOrEqual(4);
    expect(bus.listenerCount()).toBe(1); // still open after a refused check that threw
    allowed = false;
    const text = await ended;
    expect(text).toContain('event: ready');
    expect(bus.listenerCount()).toBe(0);
    const after = asked;
    await new Promise((r) => setTimeout(r, 100));
    expect(asked).toBe(after); // no more checks once ended
  });
});
