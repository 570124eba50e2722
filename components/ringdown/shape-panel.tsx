import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { FitMethodResult } from '@/shared/api/fits';
import type { NetworkResponse } from '@/shared/api/network';
import type { RecordingChannel } from '@/shared/api/recordings';
import { PolarChart, describeShape, groupColorMap, type PolarEntry } from '../charts';
import { formatHz, formatPercent } from '../format';
import { fixed, formatDegrees } from '../recordings/units';
import { SelectField } from '../select-field';
import { EmptyState } from '../state-views';
import { Num, Text } from '../text';
import { space } from '../theme';

const KIND_TITLE: Record<string, string> = { angle: 'voltage angles', frequency: 'frequencies', flow: 'MW flows', voltage: 'voltage magnitudes' };

/** Angle in (−180, 180]. */
function wrap180(deg: number): number {
  let a = ((deg + 180) % 360 + 360) % 360 - 180;
  if (a === -180) a = 180;
  return a;
}

export interface ShapeEntryRow extends PolarEntry {
  channel: string;
  siteName: string;
}

/**
 * A mode's shape from a fit: each channel's amplitude and phase at the interval start, for the
 * channels of one kind (magnitudes are comparable only within a unit), relative to the channel
 * with the largest amplitude (magnitude 1, angle 0°).
 */
export function fitShape(
  mode: FitMethodResult['modes'][number],
  kind: string,
  channels: RecordingChannel[],
  network: NetworkResponse | undefined,
): ShapeEntryRow[] {
  const kindOf = new Map(channels.map((c) => [c.name, c.kind]));
  const parts = mode.channels.filter((c) => kindOf.get(c.channel) === kind && Number.isFinite(c.amplitude));
  if (parts.length === 0) return [];
  const ref = parts.reduce((r, c) => (Math.abs(c.amplitude) > Math.abs(r.amplitude) ? c : r), parts[0]);
  const top = Math.abs(ref.amplitude) || 1;
  return parts.map((c) => {
    const netCh = network?.channels.find((x) => x.name === c.channel);
    const site = netCh ? network?.sites.find((s) => s.id === netCh.siteId) : undefined;
    const area = site ? network?.areas.find((a) => a.id === site.areaId) : undefined;
    // A negative amplitude is the same phasor turned half a turn.
    const angle = wrap180(c.phaseDeg + (c.amplitude < 0 ? 180 : 0) - (ref.phaseDeg + (ref.amplitude < 0 ? 180 : 0)));
    return {
      id: c.channel,
      channel: c.channel,
      label: site?.code ?? c.channel.split('.')[0],
      siteName: site?.name ?? c.channel.split('.')[0],
      magnitude: Math.abs(c.amplitude) / top,
      angleDeg: angle,
      group: area?.name,
    };
  });
}

export function ShapePanel({
  method,
  channels,
  network,
  trackName,
  methodTitle,
}: {
  method: FitMethodResult;
  channels: RecordingChannel[];
  network: NetworkResponse | undefined;
  trackName: (code: string | null) => string | null;
  methodTitle: string;
}) {
  const strongest = method.modes.reduce((best, m, i) => (best < 0 || m.energyShare > method.modes[best].energyShare ? i : best), -1);
  const [picked, setPicked] = useState<number | null>(null);
  const k = picked !== null && picked < method.modes.length ? picked : strongest;
  const kinds = useMemo(() => [...new Set(channels.map((c) => c.kind))], [channels]);
  const [kind, setKind] = useState<string>(kinds.includes('angle') ? 'angle' : (kinds[0] ?? 'angle'));
  const mode = k >= 0 ? method.modes[k] : null;
  const entries = useMemo(() => (mode ? fitShape(mode, kind, channels, network) : []), [mode, kind, channels, network]);
  const colorsBy = useMemo(() => groupColorMap((network?.areas ?? []).map((a) => a.name)), [network]);

  if (!mode) return <EmptyState title="No mode to show" message={`${methodTitle} found no mode in the band.`} />;
  const sorted = [...entries].sort((a, b) => b.magnitude - a.magnitude);
  return (
    <View style={styles.stack}>
      <SelectField
        label="Mode"
        accessibleLabel="Mode whose shape is shown"
        value={String(k)}
        onChange={(v) => setPicked(Number(v))}
        options={method.modes.map((m, i) => ({
          value: String(i),
          label: `${trackName(m.trackCode) ?? 'outside the tracks'} · ${formatHz(m.frequencyHz)} · ${formatPercent(m.dampingPercent)}`,
        }))}
      />
      {kinds.length > 1 ? (
        <SelectField
          label="Channels"
          accessibleLabel="Kind of channel in the mode shape"
          value={kind}
          onChange={setKind}
          options={kinds.map((x) => ({ value: x, label: KIND_TITLE[x] ?? x }))}
        />
      ) : null}
      {entries.length === 0 ? (
        <EmptyState title="No channels of this kind in the fit" />
      ) : (
        <>
          <PolarChart
            entries={entries}
            groupColors={colorsBy}
            label={`${methodTitle}, ${formatHz(mode.frequencyHz)}: ${describeShape(entries)}`}
            maxSize={320}
            testID="mode-shape-polar"
          />
          <View role="table" aria-label="Mode shape values" style={styles.table}>
            {sorted.map((e) => (
              <View key={e.id} role="row" style={styles.row}>
                <View role="cell" style={styles.site}>
                  <Text variant="small" numberOfLines={1}>
                    {e.siteName}
                  </Text>
                  <Text variant="caption" muted numberOfLines={1}>
                    {e.group ?? ''}
                  </Text>
                </View>
                <View role="cell" style={styles.num}>
                  <Num variant="small">{fixed(e.magnitude, 2)}</Num>
                </View>
                <View role="cell" style={styles.num}>
                  <Num variant="small">{formatDegrees(e.angleDeg)}</Num>
                </View>
              </View>
            ))}
          </View>
          <Text variant="caption" muted>
            {`Arrow length: amplitude relative to the largest (${sorted[0]?.siteName ?? ''}, 1.00); direction: phase relative to it, counter-clockwise positive. Sites swinging together point the same way; opposite arrows swing against each other.`}
          </Text>
        </>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.sm },
  table: { marginTop: space.xs },
  row: { flexDirection: 'row', alignItems: 'center', paddingVertical: 3, borderTopWidth: 1, borderTopColor: '#E6E1D7' },
  site: { flex: 1, minWidth: 0 },
  num: { width: 64, alignItems: 'flex-end' },
});
