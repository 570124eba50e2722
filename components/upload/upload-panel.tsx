import { useQueryClient } from '@tanstack/react-query';
import type { Href } from 'expo-router';
import { useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { UploadMapping, UploadResponse } from '@/shared/api/recordings';
import { ApiError, errorMessage } from '@/hooks/api-client';
import { useAnalysisEvents, useAnalysisQuery } from '@/hooks/use-analyses';
import { recordingKeys, unmappedColumnsOf, useRecordingQuery, useUploadRecordingMutation, type UploadFile } from '@/hooks/use-recordings';
import { Button } from '../button';
import { Panel } from '../layout';
import { formatBytes, formatDuration } from '../recordings/units';
import { formatRate } from '../format';
import { Notice } from '../state-views';
import { Num, Text } from '../text';
import { TextLink } from '../text-link';
import { colors, radii, space } from '../theme';
import { MappingForm } from './mapping-form';
import { checkFileSet, pickRecordingFiles } from './pick-files';
import { ProgressBar } from './progress-bar';

type Phase =
  | { kind: 'idle' }
  | { kind: 'sending'; sent: number; total: number | null }
  | { kind: 'ingesting'; response: UploadResponse }
  | { kind: 'done'; response: UploadResponse }
  | { kind: 'mapping'; columns: string[]; knownChannels: string[] }
  /** `again`: sending the same file again may work (a network fault), so offer it. */
  | { kind: 'refused'; title: string; message: string; existingId?: number; again?: boolean }
  | { kind: 'failed'; message: string; recordingId: number };

/**
 * "Add a recording": choose the file(s), send them with a progress bar, follow the ingest to the
 * end, map unknown columns to channels when the server asks, and show a refusal in the server's
 * own words (the line and the reason).
 */
export function UploadPanel() {
  const [files, setFiles] = useState<UploadFile[]>([]);
  const [pickError, setPickError] = useState<string | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: 'idle' });
  const [mapping, setMapping] = useState<UploadMapping | undefined>(undefined);
  const upload = useUploadRecordingMutation();
  const abort = useRef<AbortController | null>(null);
  const qc = useQueryClient();

  // Large files: the ingest job runs after the bytes are in; follow it to the end.
  const ingestId = phase.kind === 'ingesting' ? (phase.response.analysis?.id ?? null) : null;
  const ingest = useAnalysisQuery(ingestId);
  useAnalysisEvents();
  const ingestStatus = ingest.data?.analysis.status;
  // Once stored, the recording as it is now (the upload's answer predates the ingest job's work).
  const stored = useRecordingQuery(phase.kind === 'done' ? phase.response.recording.id : null);
  useEffect(() => {
    if (phase.kind !== 'ingesting' || !ingest.data) return;
    const a = ingest.data.analysis;
    if (a.status === 'done') {
      void qc.invalidateQueries({ queryKey: recordingKeys.all });
      setPhase({ kind: 'done', response: phase.response });
    } else if (a.status === 'failed') {
      void qc.invalidateQueries({ queryKey: recordingKeys.all });
      setPhase({ kind: 'failed', message: a.error ?? 'The ingest failed without a reason.', recordingId: phase.response.recording.id });
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [ingestStatus, phase.kind]);

  const choose = async () => {
    setPickError(null);
    try {
      const picked = await pickRecordingFiles();
      if (!picked) return;
      setFiles(picked);
      setMapping(undefined);
      setPhase({ kind: 'idle' });
      setPickError(checkFileSet(picked));
    } catch (e) {
      setPickError(`Could not open the file: ${errorMessage(e)}`);
    }
  };

  const start = (withMapping?: UploadMapping) => {
    const problem = checkFileSet(files);
    if (problem) {
      setPickError(problem);
      return;
    }
    const total = files.reduce((s, f) => s + (f.size ?? 0), 0) || null;
    setPhase({ kind: 'sending', sent: 0, total });
    setMapping(withMapping);
    abort.current = new AbortController();
    upload.mutate(
      {
        files,
        mapping: withMapping,
        signal: abort.current.signal,
        onProgress: (p) => setPhase((cur) => (cur.kind === 'sending' ? { kind: 'sending', sent: p.sent, total: p.total ?? total } : cur)),
      },
      {
        onSuccess: (res) => {
          if (res.analysis && res.recording.status !== 'ready') setPhase({ kind: 'ingesting', response: res });
          else setPhase({ kind: 'done', response: res });
        },
        onError: (err) => {
          const unmapped = unmappedColumnsOf(err);
          if (unmapped) {
            setPhase({ kind: 'mapping', ...unmapped });
            return;
          }
          if (err instanceof ApiError && err.code === 'DUPLICATE') {
            const existing = Number(err.details.find((d) => d.path === 'recordingId')?.message);
            setPhase({ kind: 'refused', title: 'Already uploaded', message: err.message, existingId: Number.isFinite(existing) ? existing : undefined });
            return;
          }
          if (err instanceof ApiError && (err.code === 'BAD_FILE' || err.code === 'PAYLOAD_TOO_LARGE' || err.code === 'VALIDATION')) {
            setPhase({ kind: 'refused', title: 'The file was refused', message: err.message });
            return;
          }
          setPhase({ kind: 'refused', title: 'The upload did not go through', message: errorMessage(err), again: true });
        },
      },
    );
  };

  const reset = () => {
    abort.current?.abort();
    setFiles([]);
    setMapping(undefined);
    setPickError(null);
    setPhase({ kind: 'idle' });
  };

  const fileLabel = files.map((f) => f.name).join(' + ');
  const busy = phase.kind === 'sending' || phase.kind === 'ingesting';

  return (
    <Panel title="Add a recording" label="Add a recording" testID="upload-panel">
      <Text variant="small" muted style={styles.intro}>
        CSV with a time column (UTC ISO-8601 or epoch seconds) and one column per channel, or COMTRADE (.cfg with its .dat, or
        .cff). Every row is checked; a refused file is not kept.
      </Text>

      {files.length > 0 ? (
        <View style={styles.file} testID="upload-file">
          <Text bold numberOfLines={2}>
            {fileLabel}
          </Text>
          <Num variant="small" muted>
            {formatBytes(files.reduce((s, f) => s + (f.size ?? 0), 0))}
          </Num>
        </View>
      ) : null}
      {pickError ? <Notice kind="error">{pickError}</Notice> : null}

      {phase.kind === 'sending' || phase.kind === 'ingesting' || phase.kind === 'done' ? (
        <UploadProgress phase={phase} ingestProgress={ingest.data?.analysis.progress ?? 0} label={`Upload of ${fileLabel}`} />
      ) : null}

      {phase.kind === 'done' ? (
        <View style={styles.done}>
          <Text variant="small" testID="upload-summary">
            {readySummary(stored.data?.recording ?? phase.response.recording)}
          </Text>
          <TextLink href={`/recordings/${phase.response.recording.id}` as Href} label={`Open recording ${phase.response.recording.fileName}`}>
            Open the recording
          </TextLink>
        </View>
      ) : null}

      {phase.kind === 'mapping' ? (
        <MappingForm
          columns={phase.columns}
          knownChannels={phase.knownChannels}
          busy={upload.isPending}
          onSubmit={(m) => start(m)}
          onCancel={reset}
        />
      ) : null}

      {phase.kind === 'refused' ? (
        <View role="alert" style={styles.refusal} testID="upload-refusal">
          <Text bold color={colors.danger}>
            {phase.title}
          </Text>
          {/* The server's message, word for word: it names the line and the reason. */}
          <Num variant="small" style={styles.message} selectable>
            {phase.message}
          </Num>
          {phase.existingId ? (
            <TextLink href={`/recordings/${phase.existingId}` as Href} small>
              {`Open recording ${phase.existingId}`}
            </TextLink>
          ) : (
            <Text variant="small" muted>
              Nothing of this file was kept. Correct it and upload it again.
            </Text>
          )}
        </View>
      ) : null}

      {phase.kind === 'failed' ? (
        <View role="alert" style={styles.refusal} testID="upload-refusal">
          <Text bold color={colors.danger}>
            The ingest stopped
          </Text>
          <Num variant="small" style={styles.message} selectable>
            {phase.message}
          </Num>
          <Text variant="small" muted>
            No samples of this file were kept.
          </Text>
        </View>
      ) : null}

      <View style={styles.buttons}>
        {phase.kind !== 'mapping' && phase.kind !== 'done' ? (
          <Button
            title={files.length ? 'Choose another file' : 'Choose a file…'}
            label={files.length ? 'Choose another recording file' : 'Choose a recording file'}
            kind={files.length ? 'secondary' : 'primary'}
            onPress={() => void choose()}
            disabled={busy}
            testID="upload-choose"
          />
        ) : null}
        {files.length > 0 && (phase.kind === 'idle' || (phase.kind === 'refused' && phase.again)) && !pickError ? (
          <Button title="Upload" label={`Upload ${fileLabel}`} onPress={() => start(mapping)} testID="upload-start" />
        ) : null}
        {phase.kind === 'sending' ? <Button title="Cancel" kind="quiet" onPress={reset} /> : null}
        {phase.kind === 'done' ? <Button title="Add another recording" kind="secondary" onPress={reset} /> : null}
      </View>
    </Panel>
  );
}

function readySummary(r: UploadResponse['recording']): string {
  const span = r.startTime && r.endTime ? (Date.parse(r.endTime) - Date.parse(r.startTime)) / 1000 : null;
  const parts = [`${r.fileName} is ready`];
  if (r.channelCount != null) parts.push(`${r.channelCount} channels`);
  if (span != null) parts.push(formatDuration(span));
  if (r.rate != null) parts.push(formatRate(r.rate));
  return parts.join(' · ');
}

function UploadProgress({ phase, ingestProgress, label }: { phase: Phase; ingestProgress: number; label: string }) {
  let send = 0;
  let store: number | null = null;
  let status = '';
  if (phase.kind === 'sending') {
    send = phase.total ? phase.sent / phase.total : 0;
    if (send >= 1) {
      store = 0;
      status = 'Sent. Checking every row and storing…';
    } else {
      status = `Sending ${formatBytes(phase.sent)} of ${phase.total ? formatBytes(phase.total) : '…'}`;
    }
  } else if (phase.kind === 'ingesting') {
    send = 1;
    store = ingestProgress;
    status = `Checking every row and storing: ${Math.round(ingestProgress * 100)} %`;
  } else if (phase.kind === 'done') {
    send = 1;
    store = 1;
    status = 'Ready';
  }
  return (
    <ProgressBar
      label={label}
      testID="upload-progress"
      stages={[
        { title: 'Send', value: send },
        { title: 'Check and store', value: store },
      ]}
      status={status}
      tone={phase.kind === 'done' ? 'done' : 'running'}
    />
  );
}

const styles = StyleSheet.create({
  intro: { marginBottom: space.md },
  file: {
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radii.md,
    padding: space.md,
    marginBottom: space.sm,
    backgroundColor: '#FFFFFF',
    gap: space.xxs,
  },
  done: { gap: space.xs, marginBottom: space.sm },
  refusal: {
    borderLeftWidth: 3,
    borderLeftColor: colors.danger,
    backgroundColor: colors.dangerSoft,
    borderRadius: radii.sm,
    padding: space.md,
    gap: space.xs,
    marginBottom: space.md,
  },
  message: { color: colors.ink },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, marginTop: space.sm },
});
