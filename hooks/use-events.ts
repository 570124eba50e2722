// Live updates from GET /api/events (Server-Sent Events, shared/api/events.ts). One connection per
// page, shared by every screen that asks for it and closed when the last one goes. An alert event
// refreshes Alerts and Watch; a finished scan refreshes Watch and the trends; `ready` (first
// connect and every reconnect — events are not replayed) refreshes all of them. Screens keep their
// polling too, so a platform without EventSource, or a proxy that drops the stream, only slows
// the refresh down.
import { useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { ALERT_EVENT_TYPES, alertEventSchema, analysisProgressEventSchema, type AlertEvent } from '@/shared/api/events';
import { ENDPOINTS } from '@/shared/api/endpoints';
import { alertKeys } from './use-alerts';
import { estimateKeys } from './use-estimates';
import { watchKeys } from './use-watch';

type Listener = (e: AlertEvent) => void;

let source: EventSource | null = null;
let users = 0;
let connected = false;
const alertListeners = new Set<Listener>();
const statusListeners = new Set<(live: boolean) => void>();

function setConnected(v: boolean) {
  connected = v;
  for (const l of statusListeners) l(v);
}

function open(qc: QueryClient) {
  if (source || typeof EventSource === 'undefined') return;
  const base = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');
  const es = new EventSource(`${base}${ENDPOINTS['events.stream'].path}`, { withCredentials: true });
  source = es;
  es.addEventListener('ready', () => {
    setConnected(true);
    void qc.invalidateQueries({ queryKey: watchKeys.all });
    void qc.invalidateQueries({ queryKey: alertKeys.all });
  });
  for (const type of ALERT_EVENT_TYPES) {
    es.addEventListener(type, (m) => {
      const parsed = alertEventSchema.safeParse(safeJson((m as MessageEvent).data));
      if (!parsed.success) return;
      void qc.invalidateQueries({ queryKey: alertKeys.all });
      void qc.invalidateQueries({ queryKey: watchKeys.all });
      for (const l of alertListeners) l(parsed.data);
    });
  }
  es.addEventListener('analysis.progress', (m) => {
    const parsed = analysisProgressEventSchema.safeParse(safeJson((m as MessageEvent).data));
    if (!parsed.success || parsed.data.kind !== 'scan' || parsed.data.status !== 'done') return;
    void qc.invalidateQueries({ queryKey: watchKeys.all });
    void qc.invalidateQueries({ queryKey: estimateKeys.all });
  });
  // EventSource reconnects by itself (the server suggests the delay); only note the gap.
  es.onerror = () => setConnected(false);
}

function safeJson(s: unknown): unknown {
  try {
    return typeof s === 'string' ? JSON.parse(s) : undefined;
  } catch {
    return undefined;
  }
}

function close() {
  source?.close();
  source = null;
  setConnected(false);
}

/**
 * Keeps the live-event connection open while the calling screen is mounted. Returns whether the
 * stream is connected now (for a quiet "live" note), and calls `onAlert` for each alert event.
 */
export function useLiveEvents(onAlert?: Listener): boolean {
  const qc = useQueryClient();
  const [live, setLive] = useState(connected);
  useEffect(() => {
    users += 1;
    open(qc);
    statusListeners.add(setLive);
    setLive(connected);
    return () => {
      statusListeners.delete(setLive);
      users -= 1;
      if (users === 0) close();
    };
  }, [qc]);
  useEffect(() => {
    if (!onAlert) return;
    alertListeners.add(onAlert);
    return () => {
      alertListeners.delete(onAlert);
    };
  }, [onAlert]);
  return live;
}
