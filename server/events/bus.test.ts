// The event bus on ioredis-mock (instances with the same host and port share pub/sub, like
// connections to one Redis): fan-out to every instance, channel isolation, validation.
import RedisMock from 'ioredis-mock';
import type { Redis } from 'ioredis';
import { afterEach, describe, expect, it } from 'vitest';
import type { KeelEvent } from '../../shared/api/events';
import { createEventBus, createEventPublisher, eventChannel, type EventBus } from './bus';

const opened: Redis[] = [];
function conn(): Redis {
  const r = new RedisMock({ host: 'bus-test', port: 6390 }) as unknown as Redis;
  opened.push(r);
  return r;
}
const buses: EventBus[] = [];
function bus(channel = eventChannel('keel-a'), onInvalid?: (raw: string) => void): EventBus {
  const b = createEventBus({ publisher: conn(), subscriber: conn(), channel, onInvalid });
  buses.push(b);
  return b;
}
afterEach(async () => {
  for (const b of buses.splice(0)) await b.close();
  for (const r of opened.splice(0)) r.disconnect();
});

const progress = (analysisId: number, p: number): KeelEvent => ({
  type: 'analysis.progress',
  analysisId,
  recordingId: 7,
  kind: 'scan',
  status: 'running',
  progress: p,
  error: null,
  at: '2026-06-01T12:00:00.000Z',
});

const tick = () => new Promise((r) => setTimeout(r, 20));

describe('event bus', () => {
  it('delivers an event published anywhere to the listeners of every instance', async () => {
    const serverA = bus();
    const serverB = bus();
    const worker = createEventPublisher(conn(), eventChannel('keel-a'));
    const gotA: KeelEvent[] = [];
    const gotB: KeelEvent[] = [];
    await serverA.subscribe((e) => gotA.push(e));
    await serverA.subscribe((e) => gotA.push(e)); // a second SSE client of instance A
    await serverB.subscribe((e) => gotB.push(e));
    const receivers = await worker.publish(progress(1, 0.25));
    expect(receivers).toBe(2); // one subscriber connection per instance, not per client
    await serverB.publish({
      type: 'alert.opened',
      alertId: 3,
      trackCode: 'north-south',
      trackName: 'North–south',
      kind: 'poor',
      level: 1,
      worstDamping: 2.1,
      at: '2026-06-01T12:20:00.000Z',
    });
    await tick();
    expect(gotA.map((e) => e.type)).toEqual(['analysis.progress', 'analysis.progress', 'alert.opened', 'alert.opened']);
    expect(gotB.map((e) => e.type)).toEqual(['analysis.progress', 'alert.opened']);
    expect(gotB[0]).toEqual(progress(1, 0.25));
  });

  it('keeps deployments with different prefixes apart', async () => {
    const a = bus(eventChannel('keel-a'));
    const b = bus(eventChannel('keel-b'));
    const got: string[] = [];
    await a.subscribe(() => got.push('a'));
    await b.subscribe(() => got.push('b'));
    await a.publish(progress(1, 0.5));
    await tick();
    expect(got).toEqual(['a']);
  });

  it('stops delivering to a listener after it unsubscribes, and after close', async () => {
    const a = bus();
    const got: number[] = [];
    const off = await a.subscribe((e) => got.push((e as { progress: number }).progress));
    expect(a.listenerCount()).toBe(1);
    await a.publish(progress(1, 0.1));
    await tick();
    off();
    expect(a.listenerCount()).toBe(0);
    await a.publish(progress(1, 0.2));
    await tick();
    await a.subscribe((e) => got.push((e as { progress: number }).progress * 10));
    await a.close();
    await createEventPublisher(conn(), eventChannel('keel-a')).publish(progress(1, 0.3));
    await tick();
    expect(got).toEqual([0.1]);
  });

  it('refuses to publish an invalid event and ignores malformed messages on the channel', async () => {
    const invalid: string[] = [];
    const a = bus(eventChannel('keel-a'), (raw) => invalid.push(raw));
    const got: KeelEvent[] = [];
    await a.subscribe((e) => got.push(e));
    await expect(a.publish({ ...progress(1, 0.5), progress: 1.5 } as KeelEvent)).rejects.toThrow(/progress/);
    const raw = conn();
    await raw.publish(eventChannel('keel-a'), 'not json');
    await raw.publish(eventChannel('keel-a'), JSON.stringify({ type: 'analysis.progress', analysisId: 'x' }));
    await raw.publish(eventChannel('keel-a'), JSON.stringify(progress(2, 1)));
    await tick();
    expect(invalid).toHaveLength(2);
    expect(got).toEqual([progress(2, 1)]);
  });

  it('a throwing listener does not stop the others', async () => {
    const a = bus();
    const got: number[] = [];
    await a.subscribe(() => {
      throw new Error('boom');
    });
    await a.subscribe((e) => got.push((e as { analysisId: number }).analysisId));
    await a.publish(progress(9, 0));
    await tick();
    expect(got).toEqual([9]);
  });
});
