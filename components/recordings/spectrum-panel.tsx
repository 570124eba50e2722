import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { welch } from '@/modal/spectral';
import type { RecordingDetail } from '@/shared/api/recordings';
import { errorMessage } from '@/hooks/api-client';
import { useSamplesQuery } from '@/hooks/use-recordings';
import { useTracksQuery } from '@/hooks/use-tracks';
import { GROUP_PALETTE, LineChart, type ShadedSpan } from '../charts';
import { Panel } from '../layout';
import { SelectField } from '../select-field';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { formatHzRange } from '../format';
import { Text } from '../text';
import { colors, space } from '../theme';
import { rawValues } from './samples';
import { epochOf, formatDuration, formatUtcTime, unitSymbol } from './units';

// The samples endpoint returns every sample up to this many (its maxPoints limit is 20000).
const MAX_SAMPLES = 18_000;
/** Welch segment, s: 60 s gives 0.017 Hz bins, enough to part modes 0.05 Hz apart (common practice for ambient PMU spectra). */
const SEGMENT_SECONDS = 60;
/** Frequencies shown, Hz: the electromechanical range with room above the local modes. */
const F_MAX = 2.5;

type Part = 'start' | 'middle' | 'end';

/** Removes the ±360° jumps of a wrapped angle (PMUs report −180…180°): the standard unwrap. */
function unwrapDeg(x: Float64Array): Float64Array {
  const y = Float64Array.from(x);
  let offset = 0;
  for (let i = 1; i < y.length; i++) {
    const d = x[i] - x[i - 1];
    if (d > 180) offset -= 360;
    else if (d < -180) offset += 360;
    y[i] = x[i] + offset;
  }
  return y;
}

/** Fills runs of missing samples by straight lines between their neighbours (ends: nearest value). */
function fillGaps(x: Float64Array): Float64Array {
  const y = Float64Array.from(x);
  let last = -1;
  for (let i = 0; i < y.length; i++) {
    if (!Number.isFinite(y[i])) continue;
    if (last < i - 1) {
      for (let k = last + 1; k < i; k++) y[k] = last < 0 ? y[i] : y[last] + ((y[i] - y[last]) * (k - last)) / (i - last);
    }
    last = i;
  }
  if (last < 0) return new Float64Array(0);
  for (let k = last + 1; k < y.length; k++) y[k] = y[last];
  return y;
}

/**
 * Power spectral density of one channel (Welch, Hann windows, 50 % overlap, linear detrend per
 * segment), computed here from the raw samples: the API serves samples, not spectra. Long
 * recordings are looked at ten minutes at a time.
 */
export function SpectrumPanel({ recording, channel }: { recording: RecordingDetail; channel: string }) {
  const start = epochOf(recording.startTime);
  const end = epochOf(recording.endTime);
  const rate = recording.rate ?? 30;
  const maxSpan = MAX_SAMPLES / rate;
  const long = end - start > maxSpan;
  const [part, setPart] = useState<Part>('middle');
  const span = !long
    ? { from: undefined, to: undefined }
    : part === 'start'
      ? { from: start, to: start + maxSpan }
      : part === 'end'
        ? { from: end - maxSpan, to: end }
        : { from: (start + end) / 2 - maxSpan / 2, to: (start + end) / 2 + maxSpan / 2 };
  const q = useSamplesQuery({ recordingId: recording.id, channel, from: span.from, to: span.to, maxPoints: 20_000 });
  const ch = recording.channels.find((c) => c.name === channel);
  const tracks = useTracksQuery();

  const result = useMemo(() => {
    if (!q.data || q.data.channel !== channel) return null;
    const raw = rawValues(q.data);
    if (!raw) return { error: 'The samples came back grouped; the spectrum needs every sample.' } as const;
    let x = fillGaps(raw);
    if (x.length < 64) return { error: 'Too few samples for a spectrum.' } as const;
    if (ch?.kind === 'angle') x = unwrapDeg(x);
    const nperseg = Math.min(Math.round(SEGMENT_SECONDS * q.data.rate), Math.floor(x.length / 2));
    const r = welch(x, q.data.rate, { nperseg, detrend: 'linear' });
    const pts: { x: number; y: number }[] = [];
    for (let k = 1; k < r.frequencies.length; k++) {
      const f = r.frequencies[k];
      if (f > F_MAX) break;
      pts.push({ x: f, y: 10 * Math.log10(Math.max(r.psd[k], 1e-30)) });
    }
    let peak = pts[0];
    for (const p of pts) if (p.x >= 0.1 && p.y > peak.y) peak = p;
    return { pts, segments: r.segments, resolution: q.data.rate / nperseg, from: q.data.from, to: q.data.to, peak } as const;
  }, [q.data, channel, ch?.kind]);

  const unit = ch ? unitSymbol(ch.unit) : '';
  const trackList = tracks.data?.tracks ?? [];
  const trackColor = (i: number) => GROUP_PALETTE[(i + 2) % GROUP_PALETTE.length];
  const spans: ShadedSpan[] = trackList.map((t, i) => ({ from: t.minHz, to: t.maxHz, color: trackColor(i), opacity: 0.1 }));

  return (
    <Panel title="Spectrum" label={`Spectrum of ${channel}`} testID="spectrum-panel">
      {long ? (
        <SelectField
          label="Part of the recording"
          value={part}
          onChange={(v) => setPart(v as Part)}
          options={[
            { value: 'start', label: `First ${formatDuration(maxSpan)}` },
            { value: 'middle', label: `Middle ${formatDuration(maxSpan)}` },
            { value: 'end', label: `Last ${formatDuration(maxSpan)}` },
          ]}
        />
      ) : null}
      {q.isPending ? (
        <LoadingState label="Computing the spectrum…" />
      ) : q.error ? (
        <ErrorState title="Could not load the samples" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />
      ) : !result ? (
        <LoadingState label="Computing the spectrum…" />
      ) : 'error' in result ? (
        <EmptyState title="No spectrum" message={result.error} />
      ) : (
        <View>
          <LineChart
            label={`Power spectral density of ${channel} from 0 to ${F_MAX} Hz, ${formatUtcTime(result.from)} to ${formatUtcTime(result.to)}. Highest peak above 0.1 Hz at ${result.peak.x.toFixed(3)} Hz.`}
            height={200}
            x={{ kind: 'linear', title: 'Frequency, Hz' }}
            y={{ title: `Power density, dB (${unit}²/Hz)` }}
            series={[{ kind: 'line', id: 'psd', label: 'Power spectral density', color: colors.accent, width: 1.5, points: result.pts }]}
            spans={spans}
            xExtent={[0, F_MAX]}
            legend={false}
            testID="spectrum-chart"
          />
          {trackList.length ? (
            <View style={styles.key} aria-hidden>
              {trackList.map((t, i) => (
                <View key={t.code} style={styles.keyItem}>
                  <View style={[styles.swatch, { backgroundColor: trackColor(i) }]} />
                  <Text variant="caption" muted>
                    {`${t.name} ${formatHzRange(t.minHz, t.maxHz)}`}
                  </Text>
                </View>
              ))}
            </View>
          ) : null}
          <Text variant="caption" muted style={styles.note}>
            {`Welch: ${result.segments} segments of ${Math.round(1 / result.resolution)} s, ${result.resolution.toFixed(3)} Hz resolution, ${formatUtcTime(result.from)} – ${formatUtcTime(result.to)}. Shaded: the frequency ranges of the mode tracks.`}
          </Text>
        </View>
      )}
    </Panel>
  );
}

const styles = StyleSheet.create({
  note: { marginTop: space.xs },
  key: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md, rowGap: space.xxs, marginTop: space.xs },
  keyItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 12, height: 10, borderRadius: 2, opacity: 0.45 },
});
