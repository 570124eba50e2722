import { StyleSheet, View } from 'react-native';
import { Text } from './text';
import { bands, bandText, radii, space, type BandName } from './theme';

export interface BandChipProps {
  band: BandName;
  /** Optional detail appended to the accessible label, e.g. the damping value "2.8 %". */
  detail?: string;
  size?: 'small' | 'regular';
  testID?: string;
}

/**
 * A damping band as colour + shape + word (DESIGN.md §4): colour is never the only cue. Screen
 * readers hear "Band: poor" (plus the detail) rather than the shape glyph.
 */
export function BandChip({ band, detail, size = 'regular', testID }: BandChipProps) {
  const b = bands[band];
  const small = size === 'small';
  return (
    <View
      role="img"
      aria-label={`Band: ${b.word}${detail ? `, ${detail}` : ''}`}
      testID={testID ?? `band-${band}`}
      style={[styles.chip, small && styles.small, { backgroundColor: b.tint, borderColor: b.color }]}
    >
      <Text aria-hidden variant={small ? 'caption' : 'small'} color={b.color} style={styles.shape}>
        {b.shape}
      </Text>
      <Text aria-hidden variant={small ? 'caption' : 'small'} bold color={bandText[band]}>
        {b.word}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  chip: {
    flexDirection: 'row',
    alignItems: 'center',
    alignSelf: 'flex-start',
    borderWidth: 1,
    borderRadius: radii.pill,
    paddingHorizontal: space.sm + 2,
    paddingVertical: space.xxs,
    gap: space.xs,
  },
  small: { paddingHorizontal: space.sm, paddingVertical: 0 },
  shape: { fontSize: 13 },
});
