// Trends: a track's damping and frequency over a chosen period, with the confidence band, the
// poor and low threshold lines, and the track's alert spans shaded. Zoom and pan (buttons, keys,
// drag) set the period and fetch it again: the server returns raw estimates for short spans and
// min / mean / max buckets above maxPoints, so a long span stays light and a short one detailed.
// The CSV export is the server's, for exactly the period in view.
import { router } from 'expo-router';
import { useEffect, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { TrackEstimatesResponse } from '@/shared/api/estimates';
import { errorMessage } from '@/hooks/api-client';
import { useAlertsQuery } from '@/hooks/use-alerts';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { estimatesCsvUrl, useTrackEstimatesQuery } from '@/hooks/use-estimates';
import { useTracksQuery } from '@/hooks/use-tracks';
import { DampingChart, medianSpacing } from '../charts/damping-chart';
import { LineChart, type ShadedSpan } from '../charts/line-chart';
import { useChartZoom, type Domain } from '../charts/zoom';
import { formatDateTime, formatHz, formatPercent } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { SelectField } from '../select-field';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Num, Text } from '../text';
import { bands, colors, space } from '../theme';
import { formatDuration } from '../watch/time-format';
import { DownloadLink } from './download-link';
import { DAY_MS, HOUR_MS, PeriodPicker, type PeriodChoice } from './period-picker';

export const TREND_PERIODS: PeriodChoice[] = [
  { key: '6h', title: '6 h', label: 'Last 6 hours', ms: 6 * HOUR_MS },
  { key: '24h', title: '24 h', label: 'Last 24 hours', ms: DAY_MS },
  { key: '7d', title: '7 d', label: 'Last 7 days', ms: 7 * DAY_MS },
  { key: '30d', title: '30 d', label: 'Last 30 days', ms: 30 * DAY_MS },
  { key: '90d', title: '90 d', label: 'Last 90 days', ms: 90 * DAY_MS },
];

const iso = (ms: number) => new Date(Math.round(ms)).toISOString();

export function TrendsScreen({ track: trackParam }: { track?: string }) {
  const tracks = useTracksQuery();
  const list = tracks.data?.tracks ?? [];
  const code = trackParam && list.some((t) => t.code === trackParam) ? trackParam : list[0]?.code;
  return (
    <Screen title="Trends" intro="Damping and frequency of a mode over time, with the alert periods shaded.">
      {tracks.isPending ? (
        <LoadingState label="Loading mode tracks…" />
      ) : tracks.error ? (
        <ErrorState title="Could not load the mode tracks" message={errorMessage(tracks.error)} onRetry={() => void tracks.refetch()} />
      ) : !code ? (
        <EmptyState title="No mode tracks yet" message="An administrator or engineer adds mode tracks under Network → Mode tracks." />
      ) : (
        <TrackTrends key={code} code={code} tracks={list.map((t) => ({ code: t.code, name: t.name }))} />
      )}
    </Screen>
  );
}

function TrackTrends({ code, tracks }: { code: string; tracks: { code: string; name: string }[] }) {
  const bp = useBreakpoint();
  // The period: null = the server's default (the 24 h up to the newest estimate).
  const [period, setPeriod] = useState<{ full: Domain; key: string | null } | null>(null);
  const [view, setView] = useState<Domain | null>(null);
  const [fetchWin, setFetchWin] = useState<Domain | null>(null);
  // Fetch once zooming or panning pauses, not on every step of a drag or every button press.
  useEffect(() => {
    const t = setTimeout(() => setFetchWin(view), 350);
    return () => clearTimeout(t);
  }, [view]);
  const maxPoints = bp.isCompact ? 300 : 700;
  const q = useTrackEstimatesQuery(code, fetchWin ? { from: iso(fetchWin[0]), to: iso(fetchWin[1]), maxPoints } : { from: '', to: '', maxPoints });
  // First answer (server default period) sets the period and the view.
  useEffect(() => {
    if (!period && q.data && !q.isPlaceholderData) {
      const full: Domain = [Date.parse(q.data.from), Date.parse(q.data.to)];
      setPeriod({ full, key: '24h' });
      setView(full);
    }
  }, [period, q.data, q.isPlaceholderData]);

  const full = period?.full ?? ([Date.now() - DAY_MS, Date.now()] as Domain);
  // Zoom about the middle of the estimates in view, so "Zoom in" closes in on data, not on a gap.
  const center = useMemo(() => {
    const d = q.data;
    if (!d || d.total === 0) return undefined;
    const xs = d.aggregated ? d.buckets.map((b) => Date.parse(b.start)) : d.points.map((p) => Date.parse(p.at));
    return xs.length ? (xs[0] + xs[xs.length - 1]) / 2 : undefined;
  }, [q.data]);
  const zoom = useChartZoom({ full, bounds: null, domain: view ?? full, onChange: setView, minSpan: 20 * 60_000, center });
  const alerts = useAlertsQuery({ track: code, limit: 500 });
  const now = Date.now();
  const spans: ShadedSpan[] = useMemo(
    () =>
      (alerts.data?.alerts ?? []).map((a) => ({
        from: Date.parse(a.openedAt),
        to: a.clearedAt ? Date.parse(a.clearedAt) : now,
        color: a.kind === 'forced' ? bands.forced.color : bands.poor.color,
        label: a.kind === 'forced' ? 'forced' : 'alert',
      })),
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [alerts.data],
  );

  const choose = (c: PeriodChoice) => {
    const end = period ? period.full[1] : Date.now();
    const f: Domain = [end - c.ms, end];
    setPeriod({ full: f, key: c.key });
    setView(f);
  };
  const shown = view ?? full;

  const controls = (
    <Panel style={styles.controls}>
      <SelectField
        label="Mode track"
        value={code}
        onChange={(v) => router.setParams({ track: v })}
        options={tracks.map((t) => ({ value: t.code, label: t.name }))}
        testID="trend-track"
      />
      <Text variant="small" bold style={styles.label}>
        Period (ending at the newest estimate)
      </Text>
      <PeriodPicker label="Period" choices={TREND_PERIODS} value={period && view && view[0] === period.full[0] && view[1] === period.full[1] ? period.key : null} onChange={choose} />
    </Panel>
  );

  let body;
  if (q.isPending || (!q.data && q.isFetching)) body = <LoadingState label="Loading estimates…" />;
  else if (q.error && !q.data) body = <ErrorState title="Could not load the estimates" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />;
  else if (!q.data) body = <LoadingState label="Loading estimates…" />;
  else body = <TrendCharts data={q.data} zoom={zoom} shown={shown} spans={spans} busy={q.isFetching} wide={bp.isWide} />;

  const summary = q.data ? <SummaryPanel data={q.data} shown={shown} spans={spans} code={code} /> : null;

  return bp.isWide ? (
    <Columns max={2} weights={[5, 2]}>
      <View style={styles.stack}>{body}</View>
      <View style={styles.stack}>
        {controls}
        {summary}
      </View>
    </Columns>
  ) : (
    <View style={styles.stack}>
      {controls}
      {body}
      {summary}
    </View>
  );
}

function TrendCharts({ data, zoom, shown, spans, busy, wide }: { data: TrackEstimatesResponse; zoom: ReturnType<typeof useChartZoom>; shown: Domain; spans: ShadedSpan[]; busy: boolean; wide: boolean }) {
  const t = data.track;
  const bucketMs = (data.bucketSeconds ?? 0) * 1000;
  const points = data.points.map((p) => ({ x: Date.parse(p.at), y: p.dampingPercent, lo: p.dampingLo, hi: p.dampingHi, band: p.band, forced: p.forced }));
  const buckets = data.buckets
    .filter((b) => b.dampingMean != null)
    .map((b) => ({ x: Date.parse(b.start), min: b.dampingMin!, mean: b.dampingMean!, max: b.dampingMax!, loMean: b.dampingLoMean, hiMean: b.dampingHiMean }));
  const freq = data.aggregated
    ? data.buckets.map((b) => ({ x: Date.parse(b.start) + bucketMs / 2, y: b.frequencyMean }))
    : data.points.filter((p) => !p.forced).map((p) => ({ x: Date.parse(p.at), y: p.frequencyHz }));
  const freqGap = data.aggregated ? bucketMs * 1.5 : medianSpacing(freq.map((p) => p.x)) * 4;
  const empty = data.total === 0;
  return (
    <Panel title={`${t.name}: damping ratio`} aside={busy ? <Text variant="caption" muted>Updating…</Text> : undefined} testID="trend-damping">
      <View style={styles.stack}>
        {empty ? (
          <Text variant="small" muted>
            No estimates in this period. Choose a longer period or move earlier.
          </Text>
        ) : (
          <Text variant="caption" muted>
            {data.aggregated
              ? `${data.total} estimates grouped in ${formatDuration(data.bucketSeconds ?? 0)} intervals: the line is each interval's mean, the grey band its lowest to highest.`
              : `${data.total} estimates, each marked with its band's shape.`}
          </Text>
        )}
        <DampingChart
          poorBelow={t.poorBelow}
          lowBelow={t.lowBelow}
          points={data.aggregated ? [] : points}
          buckets={data.aggregated ? buckets : []}
          bucketMs={bucketMs}
          spans={spans}
          xExtent={shown}
          zoom={zoom}
          height={wide ? 300 : 240}
          testID="trend-damping-chart"
        />
        <LineChart
          label={freq.length ? `Frequency of ${t.name}: ${freq.length} ${data.aggregated ? 'interval means' : 'estimates'}, latest ${formatHz(freq[freq.length - 1].y)}; the track's band is ${formatHz(t.minHz)} to ${formatHz(t.maxHz)}.` : `Frequency of ${t.name}: no estimates in this period.`}
          height={wide ? 190 : 160}
          x={{ kind: 'time' }}
          y={{ title: 'Frequency, Hz' }}
          series={[{ kind: 'line', id: 'f', label: 'Frequency', color: colors.ink, width: 1.5, points: freq, maxGap: freqGap }]}
          spans={spans.map((s) => ({ ...s, label: undefined }))}
          xExtent={shown}
          zoom={zoom}
          controls={false}
          legend={false}
          testID="trend-frequency-chart"
        />
      </View>
    </Panel>
  );
}

function SummaryPanel({ data, shown, spans, code }: { data: TrackEstimatesResponse; shown: Domain; spans: ShadedSpan[]; code: string }) {
  const t = data.track;
  const natural = data.points.filter((p) => !p.forced);
  let latest: number | null = null;
  let lowest: number | null = null;
  let under = 0;
  if (data.aggregated) {
    const b = data.buckets.filter((x) => x.dampingMean != null);
    latest = b.length ? b[b.length - 1].dampingMean : null;
    lowest = b.length ? Math.min(...b.map((x) => x.dampingMin!)) : null;
  } else if (natural.length) {
    latest = natural[natural.length - 1].dampingPercent;
    lowest = Math.min(...natural.map((p) => p.dampingPercent));
    under = natural.filter((p) => p.dampingPercent < t.poorBelow).length;
  }
  const alertsInView = spans.filter((s) => s.to >= Date.parse(data.from) && s.from <= Date.parse(data.to)).length;
  return (
    <Panel title="In this period" testID="trend-summary">
      <View style={styles.facts}>
        <Row label="From" value={formatDateTime(data.from)} />
        <Row label="To" value={formatDateTime(data.to)} />
        <Row label="Estimates" value={String(data.total)} />
        {latest != null ? <Row label={data.aggregated ? 'Latest mean' : 'Latest'} value={formatPercent(latest)} /> : null}
        {lowest != null ? <Row label="Lowest" value={formatPercent(lowest)} /> : null}
        {!data.aggregated && natural.length ? <Row label={`Under ${formatPercent(t.poorBelow)}`} value={`${under} of ${natural.length}`} /> : null}
        <Row label="Alerts" value={String(alertsInView)} />
      </View>
      <View style={styles.export}>
        <DownloadLink
          href={estimatesCsvUrl(code, data.from, data.to)}
          title="Download CSV"
          label={`Download the ${t.name} estimates from ${formatDateTime(data.from)} to ${formatDateTime(data.to)} as CSV`}
          fileName={`keel-${code}-estimates.csv`}
        />
        <Text variant="caption" muted>
          One row per estimate in this period, times in UTC.
        </Text>
      </View>
      {shown[1] - shown[0] !== Date.parse(data.to) - Date.parse(data.from) ? (
        <Text variant="caption" muted>
          Updating to the span in view…
        </Text>
      ) : null}
    </Panel>
  );
}

function Row({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.row}>
      <Text variant="small" muted style={styles.rowLabel}>
        {label}
      </Text>
      <Num variant="small" style={styles.rowValue}>
        {value}
      </Num>
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  controls: { gap: space.xs },
  label: { marginBottom: space.xs },
  facts: { gap: space.xs },
  row: { flexDirection: 'row', gap: space.sm },
  rowLabel: { width: 96 },
  rowValue: { flex: 1 },
  export: { marginTop: space.lg, gap: space.xs },
});
