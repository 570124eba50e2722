import { StyleSheet, View } from 'react-native';
import type { ModeEstimate } from '@/shared/api/estimates';
import type { Band } from '@/shared/bands';
import { BandChip } from '../band-chip';
import { formatDamping, formatHz } from '../format';
import { Num, Text } from '../text';
import { space } from '../theme';

/** The band an estimate is shown in: a forced oscillation is always 'forced', never 'poor'. */
export function shownBand(m: Pick<ModeEstimate, 'band' | 'forced'>): Band {
  return m.forced ? 'forced' : m.band;
}

/**
 * One mode of a window on one line: where it belongs, its frequency, its damping with the
 * interval, and its band as colour, shape and word.
 */
export function ModeLine({ mode, trackName }: { mode: ModeEstimate; trackName: string | null }) {
  const band = shownBand(mode);
  const damping = formatDamping(mode.dampingPercent, mode.dampingLo, mode.dampingHi);
  return (
    <View style={styles.row} testID={`mode-${mode.id}`}>
      <Text variant="small" bold style={styles.track} numberOfLines={1}>
        {trackName ?? 'no track'}
      </Text>
      <Num variant="small" style={styles.hz}>
        {formatHz(mode.frequencyHz)}
      </Num>
      <Num variant="small" style={styles.damping} muted={mode.forced}>
        {damping}
      </Num>
      <BandChip band={band} size="small" detail={mode.forced ? `sustained forced oscillation at ${formatHz(mode.frequencyHz)}, apparent damping ${damping}` : damping} />
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', columnGap: space.md, rowGap: space.xxs, paddingVertical: 3 },
  track: { width: 104 },
  hz: { width: 82 },
  damping: { width: 104 },
});
