// Live events over Redis pub/sub: workers and servers publish; every server instance subscribes
// once and fans the events out to its own Server-Sent-Events clients (server/events/sse.ts), so
// a client connected to any instance sees progress from any worker.
//
// One channel per deployment, named after the BullMQ prefix (tests share one Redis with unique
// prefixes and must not hear each other). A subscribed ioredis connection can do nothing else, so
// the bus takes two connections: one to publish, one to subscribe (created on first subscribe).
import type { Redis } from 'ioredis';
import { keelEventSchema, type KeelEvent } from '../../shared/api/events';

export function eventChannel(prefix: string): string {
  return `${prefix}:events`;
}

export type EventListener = (event: KeelEvent) => void;

export interface EventPublisher {
  /** Validates and publishes; resolves with the number of subscribed connections that got it. */
  publish(event: KeelEvent): Promise<number>;
}

export interface EventBus extends EventPublisher {
  /** Adds a local listener; returns the function that removes it. */
  subscribe(listener: EventListener): Promise<() => void>;
  /** Number of local listeners (SSE clients of this instance). */
  listenerCount(): number;
  /** Stops listening (does not quit the connections, which the caller owns). */
  close(): Promise<void>;
}

export function createEventPublisher(publisher: Redis, channel: string): EventPublisher {
  return {
    async publish(event) {
      const parsed = keelEventSchema.parse(event);
      return publisher.publish(channel, JSON.stringify(parsed));
    },
  };
}

export interface EventBusOptions {
  publisher: Redis;
  /** A dedicated connection that this bus puts into subscriber mode. */
  subscriber: Redis;
  channel: string;
  /** Called with messages on the channel that are not valid events (default: ignored with a warning). */
  onInvalid?: (raw: string, error: unknown) => void;
}

export function createEventBus(opts: EventBusOptions): EventBus {
  const { publisher, subscriber, channel } = opts;
  const listeners = new Set<EventListener>();
  let subscribed: Promise<void> | null = null;
  const onMessage = (ch: string, raw: string) => {
    if (ch !== channel) return;
    let event: KeelEvent;
    try {
      event = keelEventSchema.parse(JSON.parse(raw));
    } catch (err) {
      (opts.onInvalid ?? ((r: string) => console.warn(`[events] ignored a malformed event: ${r.slice(0, 200)}`)))(raw, err);
      return;
    }
    for (const l of [...listeners]) {
      try {
        l(event);
      } catch (err) {
        console.warn(`[events] a listener failed: ${(err as Error).message}`);
      }
    }
  };
  const ensureSubscribed = () => {
    if (!subscribed) {
      subscriber.on('message', onMessage);
      subscribed = subscriber.subscribe(channel).then(() => undefined);
      subscribed.catch(() => {
        subscribed = null;
        subscriber.off('message', onMessage);
      });
    }
    return subscribed;
  };
  const pub = createEventPublisher(publisher, channel);
  return {
    publish: pub.publish,
    async subscribe(listener) {
      listeners.add(listener);
      try {
        await ensureSubscribed();
      } catch (err) {
        listeners.delete(listener);
        throw err;
      }
      return () => {
        listeners.delete(listener);
      };
    },
    listenerCount: () => listeners.size,
    async close() {
      listeners.clear();
      if (subscribed) {
        subscriber.off('message', onMessage);
        subscribed = null;
        await subscriber.unsubscribe(channel).catch(() => undefined);
      }
    },
  };
}
