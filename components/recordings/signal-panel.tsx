import { useEffect, useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { RecordingDetail, SamplesResponse } from '@/shared/api/recordings';
import { errorMessage } from '@/hooks/api-client';
import { useSamplesQuery } from '@/hooks/use-recordings';
import { LineChart, useChartZoom, type ChartSeries, type Domain } from '../charts';
import { Panel } from '../layout';
import { SelectField } from '../select-field';
import { ErrorState, LoadingState } from '../state-views';
import { Text } from '../text';
import { colors, space } from '../theme';
import { samplePoints } from './samples';
import { epochOf, formatDuration, formatSeconds, formatUtcTime, unitSymbol } from './units';

export interface SignalPanelProps {
  recording: RecordingDetail;
  channel: string;
  onChannel: (name: string) => void;
  /** The fit interval, epoch seconds, drawn as a band. */
  interval: [number, number] | null;
  /** A dragged selection, epoch seconds (absent: no brushing). */
  onBrush?: (from: number, to: number) => void;
  /** The overview (whole recording) once it arrives, for a suggested interval. */
  onOverview?: (s: SamplesResponse) => void;
  title?: string;
  /** Start zoomed to this span, epoch seconds (e.g. around a fit's interval in a long recording). */
  focus?: [number, number];
}

/** Buckets asked for: about two per pixel of a wide chart. */
const MAX_POINTS = 1600;

export function channelLabel(c: { name: string; unit: string }): string {
  return `${c.name} (${unitSymbol(c.unit)})`;
}

/**
 * A channel's raw signal over the whole recording (min/max per bucket), zoomable; with a brush,
 * a drag on it selects an interval. Zoomed in, the visible span is fetched again at full detail.
 */
export function SignalPanel({ recording, channel, onChannel, interval, onBrush, onOverview, title = 'Signal', focus }: SignalPanelProps) {
  const start = epochOf(recording.startTime);
  const end = epochOf(recording.endTime);
  const full = useMemo<Domain>(() => [start * 1000, end * 1000], [start, end]);
  const zoom = useChartZoom({ full, minSpan: 2000 });
  const ch = recording.channels.find((c) => c.name === channel);
  useEffect(() => {
    if (focus && focus[1] - focus[0] < (end - start) * 0.8) zoom.set([focus[0] * 1000, focus[1] * 1000]);
    // Once, on arrival: afterwards the person zooms.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  const overview = useSamplesQuery({ recordingId: recording.id, channel, maxPoints: MAX_POINTS });
  const span = zoom.zoomed ? { from: zoom.domain[0] / 1000, to: zoom.domain[1] / 1000 } : null;
  const detail = useSamplesQuery(span ? { recordingId: recording.id, channel, from: span.from, to: span.to, maxPoints: MAX_POINTS } : null, !!span);

  const data = span && detail.data && detail.data.channel === channel ? detail.data : overview.data?.channel === channel ? overview.data : undefined;
  const overviewData = overview.data;
  useEffect(() => {
    if (overviewData && overviewData.channel === channel) onOverview?.(overviewData);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [overviewData]);

  const series = useMemo<ChartSeries[]>(
    () => (data ? [{ kind: 'line', id: 'signal', label: channel, points: samplePoints(data), color: colors.ink, width: 1.25 }] : []),
    [data, channel],
  );
  const unit = ch ? unitSymbol(ch.unit) : '';
  const options = recording.channels.map((c) => ({ value: c.name, label: channelLabel(c) }));

  return (
    <Panel title={title} label={`${title}: ${channel}`} testID="signal-panel">
      <SelectField label="Channel" accessibleLabel="Channel to plot" value={channel} options={options} onChange={onChannel} />
      {overview.isPending && !data ? (
        <LoadingState label="Loading the signal…" />
      ) : overview.error ? (
        <ErrorState title="Could not load the signal" message={errorMessage(overview.error)} onRetry={() => void overview.refetch()} />
      ) : data ? (
        <>
          <LineChart
            label={`${channel} in ${unit} from ${formatUtcTime(data.from, true)} for ${formatDuration(data.to - data.from)}.${
              data.bucketSamples > 1 ? ` Each point spans ${data.bucketSamples} samples (lowest and highest kept).` : ''
            }${interval ? ` Selected interval ${formatUtcTime(interval[0])} to ${formatUtcTime(interval[1])}.` : ''}`}
            height={220}
            x={{ kind: 'time' }}
            y={{ title: ch ? `${ch.kind === 'angle' ? 'Angle' : ch.kind === 'frequency' ? 'Frequency' : ch.kind === 'flow' ? 'Flow' : 'Voltage'}, ${unit}` : channel }}
            series={series}
            xExtent={full}
            zoom={zoom}
            what="the signal"
            legend={false}
            brush={onBrush ? { onBrush: (a, b) => onBrush(a / 1000, b / 1000), value: interval ? [interval[0] * 1000, interval[1] * 1000] : null } : undefined}
            testID="signal-chart"
          />
          <View style={styles.note}>
            <Text variant="caption" muted>
              {data.bucketSamples > 1
                ? `${formatSeconds(data.bucketSeconds, data.bucketSeconds < 1 ? 2 : 1)} per point, lowest and highest sample kept. Zoom in for every sample.`
                : 'Every sample shown.'}
              {onBrush ? ' Drag across the chart to select a fit interval, or type it in the fields.' : ''}
            </Text>
          </View>
        </>
      ) : null}
    </Panel>
  );
}

const styles = StyleSheet.create({
  note: { marginTop: space.xs },
});
