// Analyses (ingest, scan, fit): one analysis's status and progress, the analyses of a recording,
// and the live event stream (GET /api/events, Server-Sent Events) that moves progress bars
// without waiting for the next poll. Polling stays on while an analysis runs: events are not
// replayed after a reconnect, and a stream can be cut by a proxy.
import { useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { useEffect, useRef } from 'react';
import { analysisProgressEventSchema, type AnalysisProgressEvent } from '@/shared/api/events';
import type { AnalysesQuery, AnalysisResponse, AnalysisSummary } from '@/shared/api/scans';
import { callEndpoint } from './api-client';

export const analysisKeys = {
  all: ['analyses'] as const,
  lists: () => [...analysisKeys.all, 'list'] as const,
  list: (q: { recording?: number; kind?: AnalysisSummary['kind']; limit?: number }) =>
    [...analysisKeys.lists(), q.recording ?? 0, q.kind ?? '', q.limit ?? 100] as const,
  detail: (id: number) => [...analysisKeys.all, 'detail', id] as const,
};

/** Whether an analysis has still to end. */
export function isRunning(a: Pick<AnalysisSummary, 'status'> | null | undefined): boolean {
  return a?.status === 'queued' || a?.status === 'running';
}

/** Poll interval while something runs, ms (SSE usually gets there first). */
export const RUNNING_POLL_MS = 1500;

const validId = (id: number | null | undefined): id is number => id != null && Number.isFinite(id) && id > 0;

/** One analysis; polls while it is queued or running. */
export function useAnalysisQuery(id: number | null | undefined) {
  return useQuery({
    queryKey: analysisKeys.detail(validId(id) ? id : 0),
    queryFn: () => callEndpoint('analyses.get', { params: { id: id ?? 0 } }),
    enabled: validId(id),
    refetchInterval: (q) => (isRunning(q.state.data?.analysis) ? RUNNING_POLL_MS : false),
  });
}

/** Analyses, newest first (of one recording and/or kind); polls while any of them runs. */
export function useAnalysesQuery(q: Pick<AnalysesQuery, 'kind'> & { recording?: number; limit?: number }, enabled = true) {
  return useQuery({
    queryKey: analysisKeys.list(q),
    queryFn: () => callEndpoint('analyses.list', { query: { recording: q.recording, kind: q.kind, limit: q.limit } }),
    enabled,
    refetchInterval: (query) => (query.state.data?.analyses.some(isRunning) ? RUNNING_POLL_MS * 2 : false),
  });
}

// ---------------------------------------------------------------- live events

type Listener = (e: AnalysisProgressEvent) => void;

/** One EventSource per page, shared by every screen that listens (reference counted). */
let source: EventSource | null = null;
const listeners = new Set<Listener>();
const readyListeners = new Set<() => void>();

function onProgress(m: MessageEvent) {
  let parsed: AnalysisProgressEvent;
  try {
    const r = analysisProgressEventSchema.safeParse(JSON.parse(String(m.data)));
    if (!r.success) return;
    parsed = r.data;
  } catch {
    return;
  }
  for (const l of listeners) l(parsed);
}

function onReady() {
  for (const l of readyListeners) l();
}

function open(): void {
  if (source || typeof EventSource === 'undefined') return;
  const base = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');
  source = new EventSource(`${base}/api/events`, { withCredentials: true });
  source.addEventListener('analysis.progress', onProgress as EventListener);
  source.addEventListener('ready', onReady);
}

function closeIfUnused(): void {
  if (source && listeners.size === 0) {
    source.close();
    source = null;
  }
}

/** Writes an event's status and progress into the cached analysis (and its lists). */
export function applyProgressEvent(qc: QueryClient, e: AnalysisProgressEvent): void {
  const patch = (a: AnalysisSummary): AnalysisSummary =>
    a.id === e.analysisId ? { ...a, status: e.status, progress: Math.max(e.status === a.status ? a.progress : 0, e.progress), error: e.error } : a;
  qc.setQueryData<AnalysisResponse>(analysisKeys.detail(e.analysisId), (old) => (old ? { analysis: patch(old.analysis) } : old));
  qc.setQueriesData<{ analyses: AnalysisSummary[] }>({ queryKey: analysisKeys.lists() }, (old) =>
    old ? { analyses: old.analyses.map(patch) } : old,
  );
}

/**
 * Listens to the live stream while mounted. Progress goes straight into the cache; when an
 * analysis ends, `onEnd` runs (screens refetch what it produced: the recording, the scan, the fit).
 * Without EventSource (native builds) this does nothing and polling carries on alone.
 */
export function useAnalysisEvents(onEnd?: (e: AnalysisProgressEvent) => void): void {
  const qc = useQueryClient();
  // The latest callback without re-subscribing (which would reopen the stream) on every render.
  const end = useRef(onEnd);
  end.current = onEnd;
  useEffect(() => {
    const l: Listener = (e) => {
      // An analysis no list has seen yet (just queued, perhaps by the ingest's own scan): refetch the lists.
      const known = qc
        .getQueriesData<{ analyses: AnalysisSummary[] }>({ queryKey: analysisKeys.lists() })
        .some(([, d]) => d?.analyses.some((a) => a.id === e.analysisId));
      if (!known) void qc.invalidateQueries({ queryKey: analysisKeys.lists() });
      applyProgressEvent(qc, e);
      if (e.status === 'done' || e.status === 'failed') {
        void qc.invalidateQueries({ queryKey: analysisKeys.detail(e.analysisId) });
        void qc.invalidateQueries({ queryKey: analysisKeys.lists() });
        end.current?.(e);
      }
    };
    // After a reconnect nothing is replayed: refetch what may have moved meanwhile.
    const r = () => void qc.invalidateQueries({ queryKey: analysisKeys.all });
    listeners.add(l);
    readyListeners.add(r);
    open();
    return () => {
      listeners.delete(l);
      readyListeners.delete(r);
      closeIfUnused();
    };
  }, [qc]);
}
