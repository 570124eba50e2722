import { StyleSheet, View } from 'react-native';
import { bandOf } from '@/shared/bands';
import { Text } from './text';
import { bands, colors, space } from './theme';

export interface ThresholdScaleProps {
  poorBelow: number;
  lowBelow: number;
  /** Latest damping estimate, %, drawn as a marker when present. */
  value?: number | null;
}

/**
 * A damping ruler: the track's poor / low / ample bands laid out on a percent scale, with the
 * latest estimate marked. Purely visual — the same facts are written out beside it in words.
 */
export function ThresholdScale({ poorBelow, lowBelow, value }: ThresholdScaleProps) {
  // At least twice the low threshold (so the ample band shows), widened in steps of 5 % when the
  // value would sit at the very end.
  let top = Math.max(lowBelow * 2, 10);
  if (value != null && Number.isFinite(value) && value > top * 0.95) top = Math.ceil((value * 1.1) / 5) * 5;
  const pct = (v: number) => `${Math.min(100, Math.max(0, (v / top) * 100))}%` as const;
  const marker = value != null && Number.isFinite(value) ? bandOf(value, { poorBelow, lowBelow }) : null;
  return (
    <View aria-hidden style={styles.wrap}>
      <View style={styles.bar}>
        <View style={[styles.seg, { width: pct(poorBelow), backgroundColor: bands.poor.color }]} />
        <View style={[styles.seg, { width: pct(lowBelow - poorBelow), backgroundColor: bands.low.color }]} />
        <View style={[styles.seg, { flex: 1, backgroundColor: bands.ample.color }]} />
        {marker && value != null ? (
          <View style={[styles.marker, { left: pct(value) }]}>
            <View style={styles.markerLine} />
          </View>
        ) : null}
      </View>
      <View style={styles.ticks}>
        <Text mono variant="caption" muted style={[styles.tick, { left: 0 }]}>
          0
        </Text>
        <Text mono variant="caption" muted style={[styles.tick, { left: pct(poorBelow) }]}>
          {poorBelow}
        </Text>
        <Text mono variant="caption" muted style={[styles.tick, { left: pct(lowBelow) }]}>
          {lowBelow}
        </Text>
        <Text mono variant="caption" muted style={[styles.tickEnd]}>
          {top} %
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { marginTop: space.sm },
  bar: { height: 8, flexDirection: 'row', borderRadius: 4, overflow: 'visible', opacity: 0.85 },
  seg: { height: 8 },
  marker: { position: 'absolute', top: -5, width: 0, alignItems: 'center' },
  markerLine: { width: 3, height: 18, backgroundColor: colors.ink, borderRadius: 1.5, borderWidth: 1, borderColor: colors.surface },
  ticks: { height: 16, marginTop: 4 },
  tick: { position: 'absolute', transform: [{ translateX: -3 }] },
  tickEnd: { position: 'absolute', right: 0 },
});
