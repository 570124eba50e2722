// GET /api/events: Server-Sent Events (text/event-stream, the WHATWG HTML "server-sent events"
// format: `event:`/`data:` lines, a blank line ends a message, lines starting with ':' are comments).
// Wire contract: shared/api/events.ts. Plain Node request/response types so that the handler works
// under Express and in a bare http server (unit tests).
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { KeelEvent } from '../../shared/api/events';
import type { EventBus } from './bus';

/** One SSE message. JSON has no raw newlines, so `data` is a single line. */
export function formatSseMessage(event: { type: string }, id?: number): string {
  return `${id !== undefined ? `id: ${id}\n` : ''}event: ${event.type}\ndata: ${JSON.stringify(event)}\n\n`;
}

export interface SseOptions {
  /** Interval of keep-alive comments, ms (default 20 s). */
  heartbeatMs?: number;
  /** Reconnection delay suggested to EventSource, ms (default 5 s). */
  retryMs?: number;
  /** Only events this returns true for are sent (default: all). */
  filter?: (event: KeelEvent) => boolean;
  /**
   * Asked every `revalidateMs` whether the client may still listen (its session still signed in);
   * false ends the stream. An error counts as yes (a database blip must not cut every stream).
   */
  revalidate?: () => Promise<boolean>;
  /** Interval of `revalidate`, ms (default 5 s). */
  revalidateMs?: number;
}

/** Streams the bus's events to one client until it goes away. */
export async function streamEvents(req: IncomingMessage, res: ServerResponse, bus: EventBus, opts: SseOptions = {}): Promise<void> {
  res.writeHead(200, {
    'Content-Type': 'text/event-stream; charset=utf-8',
    'Cache-Control': 'no-cache, no-transform',
    Connection: 'keep-alive',
    // Reverse proxies (nginx) would otherwise buffer the stream.
    'X-Accel-Buffering': 'no',
  });
  let seq = 0;
  let closed = false;
  const write = (chunk: string) => {
    if (!closed && !res.writableEnded) res.write(chunk);
  };
  write(`retry: ${opts.retryMs ?? 5000}\n\n`);
  write(formatSseMessage({ type: 'ready' }));
  const unsubscribe = await bus.subscribe((event) => {
    if (opts.filter && !opts.filter(event)) return;
    write(formatSseMessage(event, ++seq));
  });
  const heartbeat = setInterval(() => write(`: keep-alive ${Date.now()}\n\n`), opts.heartbeatMs ?? 20_000);
  (heartbeat as unknown as { unref?: () => void }).unref?.();
  let checking = false;
  const recheck = opts.revalidate
    ? setInterval(() => {
        if (checking || closed) return;
        checking = true;
        opts.revalidate!()
          .catch(() => true)
          .then((ok) => {
            if (!ok && !closed) {
              cleanup();
              res.end();
            }
          })
          .finally(() => (checking = false));
      }, opts.revalidateMs ?? 5000)
    : null;
  (recheck as unknown as { unref?: () => void } | null)?.unref?.();
  const cleanup = () => {
    if (closed) return;
    closed = true;
    clearInterval(heartbeat);
    if (recheck) clearInterval(recheck);
    unsubscribe();
  };
  req.on('close', cleanup);
  res.on('close', cleanup);
  res.on('error', cleanup);
  if (req.destroyed) cleanup();
}
