// Recordings (uploaded PMU data): the list, one recording with its channels and data quality,
// one channel's samples for plotting (min/max per bucket), delete, and the upload itself — an
// XMLHttpRequest, because fetch cannot report how many bytes have gone out.
import { useMutation, useQuery, useQueryClient, keepPreviousData } from '@tanstack/react-query';
import { ENDPOINTS } from '@/shared/api/endpoints';
import { UPLOAD_FILE_FIELD, UPLOAD_MAPPING_FIELD, uploadResponseSchema, type UploadMapping, type UploadResponse } from '@/shared/api/recordings';
import { CSRF_HEADER, errorBodySchema } from '@/shared/errors';
import { analysisKeys } from './use-analyses';
import { ApiError, callEndpoint } from './api-client';

export const recordingKeys = {
  all: ['recordings'] as const,
  lists: () => [...recordingKeys.all, 'list'] as const,
  list: (limit: number, offset: number) => [...recordingKeys.lists(), limit, offset] as const,
  detail: (id: number) => [...recordingKeys.all, 'detail', id] as const,
  samples: (id: number, channel: string, from: number | undefined, to: number | undefined, maxPoints: number) =>
    [...recordingKeys.all, 'samples', id, channel, from ?? '', to ?? '', maxPoints] as const,
};

/** The list endpoint's largest page; the screen sorts and pages within it. */
export const RECORDINGS_FETCH_LIMIT = 500;

export function useRecordingsQuery(opts: { limit?: number; offset?: number; poll?: boolean } = {}) {
  const limit = opts.limit ?? RECORDINGS_FETCH_LIMIT;
  const offset = opts.offset ?? 0;
  return useQuery({
    queryKey: recordingKeys.list(limit, offset),
    queryFn: () => callEndpoint('recordings.list', { query: { limit, offset } }),
    // Recordings still being ingested change status on their own.
    refetchInterval: (q) => (q.state.data?.recordings.some((r) => r.status === 'ingesting' || r.status === 'uploaded') ? 3000 : false),
  });
}

const validId = (id: number | null | undefined): id is number => id != null && Number.isFinite(id) && id > 0;

export function useRecordingQuery(id: number | null | undefined) {
  return useQuery({
    queryKey: recordingKeys.detail(validId(id) ? id : 0),
    queryFn: () => callEndpoint('recordings.get', { params: { id: id ?? 0 } }),
    enabled: validId(id),
    refetchInterval: (q) => {
      const s = q.state.data?.recording.status;
      return s === 'ingesting' || s === 'uploaded' ? 2000 : false;
    },
  });
}

export interface SamplesRequest {
  recordingId: number;
  channel: string;
  /** Epoch seconds; the whole recording when left out. */
  from?: number;
  to?: number;
  /** Buckets at most (10…20000); each holds the min and max of its samples. */
  maxPoints: number;
}

/** One channel between two times, as min/max per bucket (bucketSamples 1: every sample). */
export function useSamplesQuery(req: SamplesRequest | null, enabled = true) {
  const r = req ?? { recordingId: 0, channel: '', maxPoints: 10 };
  // Round the span to milliseconds so a dragged selection does not make a new key per pixel of float noise.
  const from = r.from === undefined ? undefined : Math.round(r.from * 1000) / 1000;
  const to = r.to === undefined ? undefined : Math.round(r.to * 1000) / 1000;
  return useQuery({
    queryKey: recordingKeys.samples(r.recordingId, r.channel, from, to, r.maxPoints),
    queryFn: () =>
      callEndpoint('recordings.samples', {
        params: { id: r.recordingId },
        query: { channel: r.channel, from, to, maxPoints: r.maxPoints },
      }),
    enabled: enabled && req != null && validId(r.recordingId) && r.channel !== '',
    staleTime: 5 * 60_000,
    // Keep the previous trace on screen while the next span loads, so the chart does not blink.
    placeholderData: keepPreviousData,
  });
}

export function useDeleteRecordingMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => callEndpoint('recordings.remove', { params: { id } }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: recordingKeys.all });
      void qc.invalidateQueries({ queryKey: analysisKeys.all });
    },
  });
}

// ---------------------------------------------------------------- upload

/** A picked file: a web File, or (native builds) a local URI the platform's FormData can send. */
export interface UploadFile {
  name: string;
  size: number | null;
  file?: Blob;
  uri?: string;
  mimeType?: string;
}

export interface UploadProgress {
  /** Bytes sent so far and in all (null when the platform does not say). */
  sent: number;
  total: number | null;
}

export interface UploadRequest {
  files: UploadFile[];
  mapping?: UploadMapping;
  onProgress?: (p: UploadProgress) => void;
  /** Lets the caller cancel the transfer. */
  signal?: AbortSignal;
}

const BASE = (process.env.EXPO_PUBLIC_API_URL ?? '').replace(/\/$/, '');

async function csrfToken(): Promise<string> {
  return (await callEndpoint('auth.csrf')).csrfToken;
}

function send(req: UploadRequest, token: string): Promise<UploadResponse> {
  return new Promise((resolve, reject) => {
    const form = new FormData();
    for (const f of req.files) {
      if (f.file) form.append(UPLOAD_FILE_FIELD, f.file, f.name);
      // React Native's FormData takes a { uri, name, type } object for a local file.
      else if (f.uri) form.append(UPLOAD_FILE_FIELD, { uri: f.uri, name: f.name, type: f.mimeType ?? 'application/octet-stream' } as unknown as Blob);
    }
    if (req.mapping && Object.keys(req.mapping).length > 0) form.append(UPLOAD_MAPPING_FIELD, JSON.stringify(req.mapping));

    const xhr = new XMLHttpRequest();
    xhr.open('POST', `${BASE}${ENDPOINTS['recordings.upload'].path}`);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.setRequestHeader(CSRF_HEADER, token);
    xhr.upload.onprogress = (e) => req.onProgress?.({ sent: e.loaded, total: e.lengthComputable ? e.total : null });
    xhr.onerror = () => reject(new ApiError('NETWORK', 'Could not reach the Keel server. Check the connection and try again.', 0));
    xhr.onabort = () => reject(new ApiError('NETWORK', 'The upload was cancelled.', 0));
    xhr.onload = () => {
      let json: unknown;
      try {
        json = xhr.responseText ? JSON.parse(xhr.responseText) : undefined;
      } catch {
        reject(new ApiError(xhr.status >= 400 ? 'INTERNAL' : 'BAD_RESPONSE', `The server answered ${xhr.status} without a readable body.`, xhr.status));
        return;
      }
      if (xhr.status >= 200 && xhr.status < 300) {
        const ok = uploadResponseSchema.safeParse(json);
        if (ok.success) resolve(ok.data);
        else reject(new ApiError('BAD_RESPONSE', `Unexpected answer to the upload: ${ok.error.issues[0]?.message ?? 'invalid'}`, xhr.status));
        return;
      }
      const err = errorBodySchema.safeParse(json);
      if (err.success) reject(new ApiError(err.data.error.code, err.data.error.message, xhr.status, err.data.error.details ?? []));
      else reject(new ApiError(xhr.status === 401 ? 'UNAUTHENTICATED' : 'INTERNAL', `The server answered ${xhr.status}.`, xhr.status));
    };
    req.signal?.addEventListener('abort', () => xhr.abort());
    xhr.send(form);
  });
}

/**
 * POSTs the file(s) as multipart/form-data with the CSRF token, reporting bytes sent. The answer
 * is 201 (stored within the request) or 202 (the ingest job runs: follow `analysis`).
 */
export async function uploadRecording(req: UploadRequest): Promise<UploadResponse> {
  try {
    return await send(req, await csrfToken());
  } catch (e) {
    // A rotated session makes the token stale: fetch a new one and try once more.
    if (e instanceof ApiError && e.code === 'CSRF') return send(req, await csrfToken());
    throw e;
  }
}

export function useUploadRecordingMutation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: uploadRecording,
    onSuccess: (res) => {
      qc.setQueryData(recordingKeys.detail(res.recording.id), { recording: res.recording });
      void qc.invalidateQueries({ queryKey: recordingKeys.lists() });
      void qc.invalidateQueries({ queryKey: analysisKeys.lists() });
    },
  });
}

/** Column names of a 400 UNMAPPED_COLUMNS answer, and the channels they may be mapped to. */
export function unmappedColumnsOf(err: unknown): { columns: string[]; knownChannels: string[] } | null {
  if (!(err instanceof ApiError) || err.code !== 'UNMAPPED_COLUMNS') return null;
  const columns: string[] = [];
  const knownChannels: string[] = [];
  for (const d of err.details) {
    if (d.path.startsWith('mapping.')) columns.push(d.path.slice('mapping.'.length));
    else if (d.path === 'knownChannels') knownChannels.push(d.message);
  }
  return { columns, knownChannels };
}
