import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { ModeEstimate } from '@/shared/api/estimates';
import type { Track } from '@/shared/api/network';
import type { ScanResultsResponse, ScanWindow } from '@/shared/api/scans';
import { DEFAULT_THRESHOLDS } from '@/shared/bands';
import { errorMessage } from '@/hooks/api-client';
import { isRunning, useAnalysisEvents } from '@/hooks/use-analyses';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useScanQuery } from '@/hooks/use-scans';
import { useTracksQuery } from '@/hooks/use-tracks';
import { BandChip } from '../band-chip';
import { Button } from '../button';
import { DampingChart, LineChart, bandMarker, type ChartSeries, type DampingPoint } from '../charts';
import { formatDamping, formatDateTime, formatHz, formatHzRange } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { analysisSubject } from '../recordings/analyses-list';
import { StatusTag } from '../recordings/status';
import { pageOf } from '../recordings/table-logic';
import { formatUtcTime } from '../recordings/units';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Num, Text } from '../text';
import { TextLink } from '../text-link';
import { bands, colors, radii, space } from '../theme';
import { ProgressBar } from '../upload/progress-bar';
import { ModeLine, shownBand } from './mode-line';

const WINDOWS_PER_PAGE = 8;

interface TrackGroup {
  code: string | null;
  name: string;
  track: Track | null;
  modes: ModeEstimate[];
}

function groupByTrack(windows: ScanWindow[], tracks: Track[]): { groups: TrackGroup[]; forcedOutside: ModeEstimate[] } {
  const groups = new Map<string, TrackGroup>();
  for (const t of tracks) groups.set(t.code, { code: t.code, name: t.name, track: t, modes: [] });
  const other: TrackGroup = { code: null, name: 'Outside the mode tracks', track: null, modes: [] };
  // Forced oscillations outside every track have no damping to chart: they get their own list.
  const forcedOutside: ModeEstimate[] = [];
  for (const w of windows) {
    for (const m of w.modes) {
      const g = m.trackCode ? groups.get(m.trackCode) : undefined;
      if (g) g.modes.push(m);
      else if (m.forced) forcedOutside.push(m);
      else other.modes.push(m);
    }
  }
  const out = [...groups.values()].filter((g) => g.modes.length > 0);
  if (other.modes.length > 0) out.push(other);
  for (const g of out) g.modes.sort((a, b) => Date.parse(a.at) - Date.parse(b.at));
  return { groups: out, forcedOutside };
}

/** A scan: its progress, each tracked mode's damping over the windows, and every window's modes. */
export function ScanScreen({ id: idParam }: { id: string | undefined }) {
  const id = Number(idParam);
  const bp = useBreakpoint();
  const q = useScanQuery(Number.isFinite(id) ? id : null);
  const tracks = useTracksQuery();
  useAnalysisEvents((e) => {
    if (e.analysisId === id) void q.refetch();
  });

  if (!Number.isFinite(id) || id <= 0) {
    return (
      <Screen title="Ambient scan">
        <ErrorState title="No such scan" message={`“${idParam}” is not a scan id.`} />
      </Screen>
    );
  }
  if (q.isPending) {
    return (
      <Screen title={`Ambient scan ${id}`}>
        <LoadingState label="Loading the scan…" />
      </Screen>
    );
  }
  if (q.error) {
    return (
      <Screen title={`Ambient scan ${id}`}>
        <ErrorState title="Could not load the scan" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />
      </Screen>
    );
  }
  const data = q.data;
  const a = data.analysis;
  const { groups, forcedOutside } = groupByTrack(data.windows, tracks.data?.tracks ?? []);

  const status = <ScanStatus data={data} />;
  const charts =
    groups.length > 0 || forcedOutside.length > 0 ? (
      <View style={styles.stack}>
        {groups.map((g) => (
          <TrackDamping key={g.code ?? 'other'} group={g} />
        ))}
        {forcedOutside.length > 0 ? <ForcedPanel modes={forcedOutside} windows={data.windows.length} /> : null}
        <FrequencyPanel data={data} tracks={tracks.data?.tracks ?? []} />
      </View>
    ) : isRunning(a) ? null : a.status === 'done' ? (
      <EmptyState title="No modes found" message="No window held a mode in the scan's band. Check the channels and the band, or scan a longer recording." />
    ) : null;
  const level = typeof a.settings.confidenceLevel === 'number' ? a.settings.confidenceLevel : 0.9;
  const windows = <WindowsPanel windows={data.windows} tracks={tracks.data?.tracks ?? []} running={isRunning(a)} confidence={level} />;

  return (
    <Screen
      title={`Ambient scan ${a.id}`}
      intro={`${a.recordingName ?? `Recording ${a.recordingId}`} · ${analysisSubject(a)}`}
      actions={<TextLink href={`/recordings/${a.recordingId}`}>Back to the recording</TextLink>}
      testID="scan-screen"
    >
      {bp.isWide ? (
        <Columns max={2} weights={[3, 2]}>
          <View style={styles.stack}>
            {status}
            {charts}
          </View>
          {windows}
        </Columns>
      ) : (
        <View style={styles.stack}>
          {status}
          {charts}
          {windows}
        </View>
      )}
    </Screen>
  );
}

function ScanStatus({ data }: { data: ScanResultsResponse }) {
  const a = data.analysis;
  const modes = data.windows.reduce((s, w) => s + w.modes.length, 0);
  const forced = data.windows.reduce((s, w) => s + w.modes.filter((m) => m.forced).length, 0);
  const skipped = data.windows.filter((w) => w.skipped).length;
  return (
    <Panel title="Progress" label="Scan progress" aside={<StatusTag status={a.status} />} testID="scan-status">
      {isRunning(a) || a.status === 'done' ? (
        <ProgressBar
          label={`Ambient scan ${a.id}`}
          testID="scan-progress"
          stages={[{ title: 'Windows', value: a.status === 'done' ? 1 : a.progress }]}
          status={
            a.status === 'queued'
              ? 'Waiting for a worker'
              : a.status === 'running'
                ? `Estimating: ${data.windows.length} windows so far`
                : `Done: ${data.windows.length} windows`
          }
          tone={a.status === 'done' ? 'done' : 'running'}
        />
      ) : null}
      {a.status === 'failed' ? (
        <View role="alert" style={styles.failed}>
          <Text bold color={colors.danger}>
            The scan stopped
          </Text>
          <Num variant="small">{a.error ?? 'No reason was given.'}</Num>
        </View>
      ) : null}
      <Text variant="small" muted>
        {`${data.windows.length} windows · ${modes} mode estimates${forced ? ` · ${forced} forced` : ''}${skipped ? ` · ${skipped} windows skipped` : ''} · started ${formatDateTime(a.startedAt ?? a.createdAt)}`}
      </Text>
    </Panel>
  );
}

/** The points' time span with half a step of room at each end, so the first and last marks are not cut. */
function padded(xs: number[]): [number, number] | undefined {
  if (xs.length === 0) return undefined;
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  const step = xs.length > 1 ? (hi - lo) / (xs.length - 1) : 60_000;
  return [lo - step / 2, hi + step / 2];
}

function TrackDamping({ group }: { group: TrackGroup }) {
  const t = group.track;
  const th = t ? { poorBelow: t.poorBelow, lowBelow: t.lowBelow } : DEFAULT_THRESHOLDS;
  const points: DampingPoint[] = group.modes.map((m) => ({
    x: Date.parse(m.at),
    y: m.dampingPercent,
    lo: m.dampingLo,
    hi: m.dampingHi,
    band: shownBand(m),
    forced: m.forced,
  }));
  const latest = group.modes[group.modes.length - 1];
  const natural = group.modes.filter((m) => !m.forced);
  let lowest: ModeEstimate | null = null;
  for (const m of natural) if (!lowest || m.dampingPercent < lowest.dampingPercent) lowest = m;
  return (
    <Panel
      title={group.name}
      label={`Damping of ${group.name}`}
      aside={latest ? <BandChip band={shownBand(latest)} detail={formatDamping(latest.dampingPercent, latest.dampingLo, latest.dampingHi)} /> : undefined}
      testID={`scan-track-${group.code ?? 'other'}`}
    >
      <Text variant="small" muted style={styles.under}>
        {`${t ? `${formatHzRange(t.minHz, t.maxHz)} · ` : ''}${group.modes.length} ${group.modes.length === 1 ? 'estimate' : 'estimates'}${lowest ? ` · lowest ${formatDamping(lowest.dampingPercent, lowest.dampingLo, lowest.dampingHi)} at ${formatUtcTime(Date.parse(lowest.at) / 1000)}` : ''}`}
      </Text>
      <DampingChart poorBelow={th.poorBelow} lowBelow={th.lowBelow} points={points} xExtent={padded(points.map((p) => p.x))} height={200} testID={`damping-chart-${group.code ?? 'other'}`} />
    </Panel>
  );
}

/** Forced oscillations outside the tracks: where and how often, grouped by frequency (0.01 Hz). */
function ForcedPanel({ modes, windows }: { modes: ModeEstimate[]; windows: number }) {
  const byHz = new Map<number, ModeEstimate[]>();
  for (const m of modes) {
    const k = Math.round(m.frequencyHz * 100);
    byHz.set(k, [...(byHz.get(k) ?? []), m]);
  }
  return (
    <Panel title="Forced oscillations" label="Forced oscillations outside the mode tracks" aside={<BandChip band="forced" />} testID="scan-forced">
      <Text variant="small" muted style={styles.under}>
        Sustained sinusoids driven from outside the grid’s own dynamics, outside every mode track. They are not counted as poorly damped modes.
      </Text>
      {[...byHz.entries()]
        .sort((a, b) => a[0] - b[0])
        .map(([k, list]) => {
          const mean = list.reduce((s, m) => s + m.frequencyHz, 0) / list.length;
          const first = list.reduce((a, m) => (Date.parse(m.at) < Date.parse(a.at) ? m : a), list[0]);
          return (
            <View key={k} style={styles.forcedRow}>
              <Text aria-hidden color={bands.forced.color}>
                {bands.forced.shape}
              </Text>
              <Num variant="small" bold>
                {formatHz(mean)}
              </Num>
              <Text variant="small">{`in ${list.length} of ${windows} windows, first in the window ending ${formatUtcTime(Date.parse(first.at) / 1000)}`}</Text>
            </View>
          );
        })}
    </Panel>
  );
}

function FrequencyPanel({ data, tracks }: { data: ScanResultsResponse; tracks: Track[] }) {
  const series = useMemo<ChartSeries[]>(() => {
    const pts = data.windows.flatMap((w) => w.modes.map((m) => ({ x: Date.parse(m.at), y: m.frequencyHz, ...bandMarker(shownBand(m)) })));
    return [{ kind: 'points', id: 'modes', label: 'Mode (shape and colour: band)', color: colors.accent, points: pts }];
  }, [data]);
  if (series[0].points.length === 0) return null;
  return (
    <Panel title="Frequency" label="Frequency of every mode found" testID="scan-frequency">
      <LineChart
        label={`Frequency of every mode found in the scan's ${data.windows.length} windows; tracks: ${tracks.map((t) => `${t.name} ${formatHzRange(t.minHz, t.maxHz)}`).join(', ')}.`}
        height={200}
        x={{ kind: 'time' }}
        y={{ title: 'Frequency, Hz', include: [0] }}
        xExtent={padded(series[0].points.map((p) => p.x))}
        series={series}
        legend={false}
      />
      <BandKey />
    </Panel>
  );
}

/** What the point shapes mean (every chart's marks carry shape, colour and word). */
export function BandKey() {
  return (
    <View style={styles.key} aria-hidden>
      {(['ample', 'low', 'poor', 'forced'] as const).map((b) => (
        <Text key={b} variant="caption" muted>
          <Text variant="caption" color={bands[b].color}>
            {bands[b].shape}
          </Text>{' '}
          {bands[b].word}
        </Text>
      ))}
    </View>
  );
}

function WindowsPanel({ windows, tracks, running, confidence }: { windows: ScanWindow[]; tracks: Track[]; running: boolean; confidence: number }) {
  const [page, setPage] = useState(0);
  const newestFirst = useMemo(() => [...windows].sort((a, b) => Date.parse(b.end) - Date.parse(a.end)), [windows]);
  const { rows, info } = pageOf(newestFirst, page, WINDOWS_PER_PAGE);
  const name = (code: string | null) => (code ? (tracks.find((t) => t.code === code)?.name ?? code) : null);
  return (
    <Panel title="Windows" label="Windows and their modes" testID="scan-windows">
      {windows.length === 0 ? (
        running ? (
          <LoadingState label="The first window is being estimated…" />
        ) : (
          <EmptyState title="No windows" message="The recording may be shorter than one window." />
        )
      ) : (
        <>
          <View role="list" aria-label="Windows" style={styles.windows}>
            {rows.map((w) => (
              <View key={w.id} role="listitem" style={styles.window} testID={`window-${w.id}`}>
                <View style={styles.windowHead}>
                  <Num variant="small" bold>
                    {`${formatUtcTime(Date.parse(w.start) / 1000)} – ${formatUtcTime(Date.parse(w.end) / 1000)}`}
                  </Num>
                  {Object.entries(w.transferMw).map(([code, mw]) => (
                    <Num key={code} variant="caption" muted>
                      {`${code} ${Math.round(mw)} MW`}
                    </Num>
                  ))}
                </View>
                {w.skipped ? (
                  <Text variant="small" muted>{`Skipped: ${w.reason ?? 'not enough data'}`}</Text>
                ) : w.modes.length === 0 ? (
                  <Text variant="small" muted>
                    No mode in the band.
                  </Text>
                ) : (
                  [...w.modes].sort((a, b) => a.frequencyHz - b.frequencyHz).map((m) => <ModeLine key={m.id} mode={m} trackName={name(m.trackCode)} />)
                )}
              </View>
            ))}
          </View>
          {info.pageCount > 1 ? (
            <View style={styles.pager}>
              <Num variant="small" muted>{`${info.first}–${info.last} of ${info.total}, newest first`}</Num>
              <View style={styles.pagerButtons}>
                <Button title="Newer" label="Newer windows" kind="secondary" compact disabled={info.page === 0} onPress={() => setPage(info.page - 1)} />
                <Button title="Older" label="Older windows" kind="secondary" compact disabled={info.page >= info.pageCount - 1} onPress={() => setPage(info.page + 1)} />
              </View>
            </View>
          ) : null}
          <Text variant="caption" muted style={styles.under}>
            {`Damping ratio with the half-width of its ${Math.round(confidence * 100)} % confidence interval. A forced oscillation (∿) is a sustained sinusoid driven from outside, not a poorly damped mode.`}
          </Text>
        </>
      )}
    </Panel>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  failed: { padding: space.sm, borderRadius: radii.sm, backgroundColor: colors.dangerSoft, gap: space.xxs, marginBottom: space.sm },
  under: { marginBottom: space.sm },
  key: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, marginTop: space.xs },
  windows: { gap: 0 },
  forcedRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'baseline', columnGap: space.sm, paddingVertical: 2 },
  window: { paddingVertical: space.sm, borderTopWidth: 1, borderTopColor: '#E6E1D7', gap: 2 },
  windowHead: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'baseline', columnGap: space.md },
  pager: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', flexWrap: 'wrap', gap: space.sm, marginTop: space.sm },
  pagerButtons: { flexDirection: 'row', gap: space.sm },
});
