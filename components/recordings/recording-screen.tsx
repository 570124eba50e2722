import { router, type Href } from 'expo-router';
import { useCallback, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { SamplesResponse } from '@/shared/api/recordings';
import { errorMessage } from '@/hooks/api-client';
import { useAnalysisEvents } from '@/hooks/use-analyses';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useDeleteRecordingMutation, useRecordingQuery } from '@/hooks/use-recordings';
import { Button } from '../button';
import { FitFormPanel } from '../fits/fit-form';
import { formatRate } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { ScanFormPanel } from '../scans/scan-form';
import { ErrorState, LoadingState, Notice } from '../state-views';
import { Text } from '../text';
import { TextLink } from '../text-link';
import { space } from '../theme';
import { AnalysesList } from './analyses-list';
import { ChannelsPanel, RecordingFacts } from './recording-facts';
import { largestStep } from './samples';
import { SignalPanel } from './signal-panel';
import { SpectrumPanel } from './spectrum-panel';
import { epochOf, formatDuration, formatUtcTime } from './units';

/** Seconds a suggested ring-down interval lasts (the 10–30 s after the event; DESIGN.md §1). */
const SUGGESTED_FIT_SECONDS = 20;

/** One recording: what it is, its signal and spectrum, its channels, and scans and fits of it. */
export function RecordingScreen({ id: idParam }: { id: string | undefined }) {
  const id = Number(idParam);
  const bp = useBreakpoint();
  const can = useCan();
  const mayRun = can('runAnalysis');
  const q = useRecordingQuery(Number.isFinite(id) ? id : null);
  const [channel, setChannel] = useState<string | null>(null);
  const [interval, setFitInterval] = useState<[number, number] | null>(null);
  const [suggested, setSuggested] = useState<string | null>(null);
  const [confirmDelete, setConfirmDelete] = useState(false);
  const remove = useDeleteRecordingMutation();
  useAnalysisEvents();

  const rec = q.data?.recording;
  const start = epochOf(rec?.startTime);
  const end = epochOf(rec?.endTime);

  // Suggest the interval after the largest step of the first channel plotted (the event of a
  // ring-down recording), once, before the person picks one.
  const onOverview = useCallback(
    (s: SamplesResponse) => {
      if (interval || suggested !== null) return;
      const t = largestStep(s);
      if (t === null) {
        setSuggested('');
        return;
      }
      const from = Math.min(Math.max(start, t + s.bucketSeconds), end - 2);
      const to = Math.min(end, from + SUGGESTED_FIT_SECONDS);
      if (to - from >= 2) {
        setFitInterval([from, to]);
        setSuggested(`Suggested: the ${formatDuration(to - from)} after the largest step in ${s.channel}, at ${formatUtcTime(t)}.`);
      } else setSuggested('');
    },
    [interval, suggested, start, end],
  );

  // The person's own choice replaces the suggestion (and its note).
  const choose = (iv: [number, number]) => {
    setFitInterval(iv);
    if (suggested) setSuggested('');
  };

  if (!Number.isFinite(id) || id <= 0) {
    return (
      <Screen title="Recording">
        <ErrorState title="No such recording" message={`“${idParam}” is not a recording id.`} />
      </Screen>
    );
  }
  if (q.isPending) {
    return (
      <Screen title="Recording">
        <LoadingState label="Loading the recording…" />
      </Screen>
    );
  }
  if (q.error || !rec) {
    return (
      <Screen title="Recording">
        <ErrorState title="Could not load the recording" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />
        <TextLink href="/recordings">Back to the recordings</TextLink>
      </Screen>
    );
  }

  const shown = channel ?? rec.channels[0]?.name ?? null;
  const ready = rec.status === 'ready' && rec.channels.length > 0 && shown !== null;

  const facts = <RecordingFacts recording={rec} />;
  const signal = ready ? (
    <SignalPanel
      recording={rec}
      channel={shown}
      onChannel={setChannel}
      interval={interval}
      onBrush={mayRun ? (a, b) => choose([a, b]) : undefined}
      onOverview={onOverview}
    />
  ) : null;
  const spectrum = ready ? <SpectrumPanel recording={rec} channel={shown} /> : null;
  const channels = rec.channels.length > 0 ? <ChannelsPanel recording={rec} /> : null;
  const fitForm =
    ready && mayRun ? (
      <FitFormPanel recording={rec} interval={interval} onInterval={(a, b) => choose([a, b])} notice={suggested} />
    ) : null;
  const scanForm = ready && mayRun ? <ScanFormPanel recording={rec} /> : null;
  const analyses = (
    <Panel title="Scans and fits of this recording" label="Scans and fits of this recording">
      <AnalysesList recordingId={rec.id} emptyMessage={mayRun ? 'Start an ambient scan or a ring-down fit with the forms on this page.' : undefined} />
    </Panel>
  );
  const notReady =
    rec.status === 'ingesting' || rec.status === 'uploaded' ? (
      <LoadingState label="The recording is still being checked and stored…" />
    ) : null;

  const danger = mayRun ? (
    <View style={styles.danger}>
      {confirmDelete ? (
        <>
          <Text variant="small">Delete this recording with its samples, scans and fits?</Text>
          <View style={styles.row}>
            <Button
              title="Delete"
              label={`Delete recording ${rec.fileName}`}
              kind="danger"
              compact
              busy={remove.isPending}
              onPress={() => remove.mutate(rec.id, { onSuccess: () => router.replace('/recordings' as Href) })}
            />
            <Button title="Keep it" kind="quiet" compact onPress={() => setConfirmDelete(false)} />
          </View>
          {remove.error ? <Notice kind="error">{errorMessage(remove.error)}</Notice> : null}
        </>
      ) : (
        <Button title="Delete recording…" kind="quiet" compact onPress={() => setConfirmDelete(true)} />
      )}
    </View>
  ) : null;

  const intro = `${rec.channelCount ?? rec.channels.length} channels${rec.rate ? ` at ${formatRate(rec.rate)}` : ''}${
    Number.isFinite(end - start) ? `, ${formatDuration(end - start)} from ${formatUtcTime(start, true)}` : ''
  }.`;

  return (
    <Screen title={rec.fileName} intro={intro} actions={<TextLink href="/recordings">All recordings</TextLink>} testID="recording-screen">
      {notReady}
      {bp.isWide ? (
        <Columns max={2} weights={[3, 2]}>
          <View style={styles.stack}>
            {signal}
            {spectrum}
            {channels}
          </View>
          <View style={styles.stack}>
            {facts}
            {fitForm}
            {scanForm}
            {analyses}
            {danger}
          </View>
        </Columns>
      ) : (
        <View style={styles.stack}>
          {facts}
          {signal}
          {fitForm}
          {scanForm}
          {analyses}
          {spectrum}
          {channels}
          {danger}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  danger: { gap: space.sm, alignItems: 'flex-start' },
  row: { flexDirection: 'row', gap: space.sm },
});
