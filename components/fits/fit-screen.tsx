import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { FitDetailResponse, FitMethodResult } from '@/shared/api/fits';
import type { RecordingDetail } from '@/shared/api/recordings';
import { errorMessage } from '@/hooks/api-client';
import { isRunning, useAnalysisEvents } from '@/hooks/use-analyses';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { fitCsvUrl, useFitQuery } from '@/hooks/use-fits';
import { useNetworkQuery } from '@/hooks/use-network';
import { useRecordingQuery } from '@/hooks/use-recordings';
import { useTracksQuery } from '@/hooks/use-tracks';
import { Columns, Panel, Screen } from '../layout';
import { StatusTag } from '../recordings/status';
import { SignalPanel, channelLabel } from '../recordings/signal-panel';
import { epochOf, formatDb, formatSeconds, formatUtcTime, unitSymbol } from '../recordings/units';
import { RingdownCharts } from '../ringdown/fit-charts';
import { MethodPicker } from '../ringdown/method-picker';
import { ModeSwitches } from '../ringdown/mode-switches';
import { METHOD_TITLE, ModesTable } from '../ringdown/modes-table';
import { ShapePanel } from '../ringdown/shape-panel';
import { SelectField } from '../select-field';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Num, Text } from '../text';
import { TextLink } from '../text-link';
import { colors, radii, space } from '../theme';
import { ProgressBar } from '../upload/progress-bar';
import { DownloadLink } from './download-link';
import { FitFormPanel } from './fit-form';

const QUANTITY: Record<string, string> = { angle: 'Angle', frequency: 'Frequency', flow: 'Flow', voltage: 'Voltage' };

/**
 * The ring-down view: a fit's reconstruction over the raw (detrended) signal, each mode
 * switchable, the residual, both methods' modes side by side, the mode shape, and a new interval
 * brushed on the raw signal to fit again.
 */
export function FitScreen({ id: idParam }: { id: string | undefined }) {
  const id = Number(idParam);
  const q = useFitQuery(Number.isFinite(id) && id > 0 ? id : null);
  const rec = useRecordingQuery(q.data?.analysis.recordingId ?? null);
  useAnalysisEvents((e) => {
    if (e.analysisId === id) void q.refetch();
  });

  if (!Number.isFinite(id) || id <= 0) {
    return (
      <Screen title="Ring-down fit">
        <ErrorState title="No such fit" message={`“${idParam}” is not a fit id.`} />
      </Screen>
    );
  }
  if (q.isPending) {
    return (
      <Screen title={`Ring-down fit ${id}`}>
        <LoadingState label="Loading the fit…" />
      </Screen>
    );
  }
  if (q.error) {
    return (
      <Screen title={`Ring-down fit ${id}`}>
        <ErrorState title="Could not load the fit" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />
        <TextLink href="/recordings">Back to the recordings</TextLink>
      </Screen>
    );
  }
  return <FitView key={id} fit={q.data} recording={rec.data?.recording ?? null} recordingError={rec.error ? errorMessage(rec.error) : null} />;
}

function FitView({ fit, recording, recordingError }: { fit: FitDetailResponse; recording: RecordingDetail | null; recordingError: string | null }) {
  const a = fit.analysis;
  const bp = useBreakpoint();
  const can = useCan();
  const tracks = useTracksQuery();
  const network = useNetworkQuery();
  const from = epochOf(fit.from);
  const to = epochOf(fit.to);
  const done = a.status === 'done' && fit.methods.length > 0;

  const [methodKey, setMethodKey] = useState<FitMethodResult['method']>('matrix-pencil');
  const method = fit.methods.find((m) => m.method === methodKey) ?? fit.methods[0];
  const [channel, setChannel] = useState<string | null>(null);
  const [enabled, setEnabled] = useState<Record<string, boolean[]>>({});
  const [rawChannel, setRawChannel] = useState<string | null>(null);
  const [interval, setInterval2] = useState<[number, number]>([from, to]);

  // The channel shown first: the one the strongest mode moves most (relative to its own signal).
  const defaultChannel = useMemo(() => {
    const series = method?.reconstruction.series ?? [];
    let best: string | null = series[0]?.channel ?? null;
    let bestShare = -1;
    for (const s of series) {
      let e = 0;
      let t = 0;
      for (let i = 0; i < s.input.length; i++) {
        e += s.total[i] * s.total[i];
        t += s.input[i] * s.input[i];
      }
      const share = t > 0 ? e / t : 0;
      if (share > bestShare) {
        bestShare = share;
        best = s.channel;
      }
    }
    return best;
  }, [method]);
  const shown = channel ?? defaultChannel;
  const series = method?.reconstruction.series.find((s) => s.channel === shown) ?? method?.reconstruction.series[0];
  const modeOn = method ? (enabled[method.method] ?? method.modes.map(() => true)) : [];
  useEffect(() => {
    if (!rawChannel && shown) setRawChannel(shown);
  }, [shown, rawChannel]);

  const chInfo = recording?.channels.find((c) => c.name === series?.channel);
  const unit = chInfo ? unitSymbol(chInfo.unit) : '';
  const quantity = chInfo ? (QUANTITY[chInfo.kind] ?? 'Value') : 'Value';
  const trackName = (code: string | null) => (code ? (tracks.data?.tracks.find((t) => t.code === code)?.name ?? code) : null);
  const methodTitle = method ? METHOD_TITLE[method.method] : '';
  const otherMethods = fit.methods.length === 2 ? fit.methods : null;

  const intro = `${a.recordingName ?? `Recording ${a.recordingId}`} · ${formatSeconds(to - from)} from ${formatUtcTime(from, true)} · ${fit.channels.length} channels · Prony and matrix pencil`;

  const status =
    isRunning(a) || a.status === 'failed' ? (
      <Panel title="Progress" label="Fit progress" aside={<StatusTag status={a.status} />} testID="fit-status">
        {isRunning(a) ? (
          <ProgressBar
            label={`Ring-down fit ${a.id}`}
            testID="fit-progress"
            stages={[{ title: 'Fit', value: a.progress }]}
            status={a.status === 'queued' ? 'Waiting for a worker' : 'Fitting Prony and the matrix pencil…'}
          />
        ) : (
          <View role="alert" style={styles.failed}>
            <Text bold color={colors.danger}>
              The fit stopped
            </Text>
            <Num variant="small">{a.error ?? 'No reason was given.'}</Num>
            <Text variant="small" muted>
              Choose another interval below and fit again.
            </Text>
          </View>
        )}
      </Panel>
    ) : null;

  const view =
    done && method && series ? (
      <Panel title="Signal and reconstruction" label="Signal and reconstruction" testID="ringdown-view">
        <View style={[styles.controls, bp.isCompact && styles.controlsCompact]}>
          <MethodPicker
            label="Method"
            value={method.method}
            onChange={(v) => setMethodKey(v as FitMethodResult['method'])}
            options={fit.methods.map((m) => ({ value: m.method, title: METHOD_TITLE[m.method], detail: `SNR ${formatDb(m.snrDb)}` }))}
          />
          <View style={styles.channelPick}>
            <SelectField
              label="Channel"
              accessibleLabel="Channel shown"
              value={series.channel}
              onChange={setChannel}
              options={method.reconstruction.series.map((s) => {
                const c = recording?.channels.find((x) => x.name === s.channel);
                return { value: s.channel, label: c ? channelLabel(c) : s.channel };
              })}
            />
          </View>
        </View>
        <RingdownCharts series={series} stepSeconds={method.reconstruction.stepSeconds} enabled={modeOn} unit={unit} quantity={quantity} methodTitle={methodTitle} />
        {method.reconstruction.points < method.reconstruction.fullPoints ? (
          <Text variant="caption" muted style={styles.note}>
            {`Drawn at every ${Math.round(method.reconstruction.fullPoints / method.reconstruction.points)}th sample (${method.reconstruction.points} of ${method.reconstruction.fullPoints}); the CSV export has every mode.`}
          </Text>
        ) : null}
      </Panel>
    ) : a.status === 'done' ? (
      <EmptyState title="No modes" message="The fit ended without a result for either method." />
    ) : null;

  const switches =
    done && method && series ? (
      <Panel title="Modes in the reconstruction" label="Modes in the reconstruction">
        <Text variant="small" muted style={styles.note}>
          {`${methodTitle}: switch a mode off to see the signal without it; the residual then shows its part.`}
        </Text>
        <ModeSwitches
          method={method}
          methodTitle={methodTitle}
          channel={series.channel}
          unit={unit}
          enabled={modeOn}
          onChange={(v) => setEnabled((cur) => ({ ...cur, [method.method]: v }))}
          trackName={trackName}
        />
      </Panel>
    ) : null;

  const table =
    done && otherMethods && series ? (
      <Panel title="Prony and matrix pencil side by side" label="Prony and matrix pencil side by side">
        <ModesTable a={otherMethods[0]} b={otherMethods[1]} channel={series.channel} unit={unit} trackName={trackName} mode={bp.name === 'xwide' ? 'table' : 'cards'} />
      </Panel>
    ) : null;

  const shape =
    done && method && recording ? (
      <Panel title="Mode shape" label="Mode shape">
        <ShapePanel method={method} channels={recording.channels} network={network.data} trackName={trackName} methodTitle={methodTitle} />
      </Panel>
    ) : null;

  const mayRun = can('runAnalysis');
  const rawSignal =
    recording && recording.status === 'ready' && rawChannel ? (
      <SignalPanel
        title="Raw signal"
        recording={recording}
        channel={rawChannel}
        onChannel={setRawChannel}
        interval={interval}
        onBrush={mayRun ? (x, y) => setInterval2([x, y]) : undefined}
        focus={[from - Math.max(10, to - from), to + Math.max(10, to - from)]}
      />
    ) : recordingError ? (
      <ErrorState title="Could not load the recording" message={recordingError} />
    ) : null;
  const refitForm =
    recording && recording.status === 'ready' && mayRun ? (
      <FitFormPanel
        recording={recording}
        interval={interval}
        onInterval={(x, y) => setInterval2([x, y])}
        initial={{
          // Until the fit is done the API may not list its channels yet: then every channel.
          channels: fit.channels.length ? fit.channels : undefined,
          order: a.settings.order === 'auto' || typeof a.settings.order === 'number' ? (a.settings.order as 'auto' | number) : 'auto',
          bandHz: Array.isArray(a.settings.bandHz) ? (a.settings.bandHz as [number, number]) : undefined,
        }}
        title="Fit another interval"
        submitTitle="Fit again"
        intro="Drag across the raw signal to choose a new interval, or type it. The new fit opens as soon as it is queued."
        testID="refit-form"
      />
    ) : null;

  const actions = (
    <View style={styles.actions}>
      {done ? <DownloadLink href={fitCsvUrl(a.id)} title="Download CSV" label={`Download fit ${a.id} as CSV`} fileName={`keel-fit-${a.id}.csv`} /> : null}
      <TextLink href={`/recordings/${a.recordingId}`}>Back to the recording</TextLink>
    </View>
  );

  return (
    <Screen title={`Ring-down fit ${a.id}`} intro={intro} actions={actions} testID="fit-screen">
      {bp.isWide ? (
        <View style={styles.stack}>
          {status}
          <Columns max={2} weights={[3, 2]}>
            {view}
            <View style={styles.stack}>
              {switches}
              {shape}
            </View>
          </Columns>
          {table}
          <Columns max={2} weights={[3, 2]}>
            {rawSignal}
            {refitForm}
          </Columns>
        </View>
      ) : (
        <View style={styles.stack}>
          {status}
          {view}
          {switches}
          {table}
          {shape}
          {rawSignal}
          {refitForm}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  actions: { flexDirection: 'row', alignItems: 'center', flexWrap: 'wrap', gap: space.md },
  controls: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-start', columnGap: space.lg },
  controlsCompact: { flexDirection: 'column', alignItems: 'stretch' },
  channelPick: { flexGrow: 1, minWidth: 200 },
  note: { marginTop: space.xs, marginBottom: space.sm },
  failed: { padding: space.sm, borderRadius: radii.sm, backgroundColor: colors.dangerSoft, gap: space.xxs },
});
