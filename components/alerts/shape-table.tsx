// The mode shape as numbers: each PMU channel's site, area, relative magnitude and angle.
import { StyleSheet, View } from 'react-native';
import type { ShapeEntry } from '@/shared/api/estimates';
import { tickNumber } from '../charts/ticks';
import { Num, Text } from '../text';
import { colors, space } from '../theme';

export function ShapeTable({ entries, colorsBy }: { entries: ShapeEntry[]; colorsBy: Record<string, string> }) {
  return (
    <View role="table" aria-label="Mode shape by channel" style={styles.table}>
      <View role="row" style={[styles.row, styles.head]}>
        <Text role="columnheader" variant="caption" bold muted style={styles.site}>
          SITE · CHANNEL
        </Text>
        <Text role="columnheader" variant="caption" bold muted style={styles.num}>
          MAGNITUDE
        </Text>
        <Text role="columnheader" variant="caption" bold muted style={styles.num}>
          ANGLE
        </Text>
      </View>
      {entries.map((e) => (
        <View role="row" key={e.channel} style={styles.row}>
          <View role="cell" style={[styles.site, styles.siteCell]}>
            <View style={[styles.swatch, { backgroundColor: colorsBy[e.area] ?? colors.ink }]} />
            <View style={styles.siteText}>
              <Text variant="small" bold numberOfLines={1}>
                {e.siteName}
              </Text>
              <Text variant="caption" muted numberOfLines={1}>
                {e.area} · {e.channel.startsWith(`${e.site}.`) ? e.channel.slice(e.site.length + 1) : e.channel}
              </Text>
            </View>
          </View>
          <Num role="cell" variant="small" style={styles.num}>
            {e.magnitude.toFixed(2)}
          </Num>
          <Num role="cell" variant="small" style={styles.num}>
            {`${tickNumber(Math.round(e.angleDeg), 0)}°`}
          </Num>
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderTopWidth: 1, borderColor: colors.rule },
  row: { flexDirection: 'row', alignItems: 'center', borderBottomWidth: 1, borderColor: colors.rule, paddingVertical: space.xs, gap: space.sm },
  head: { paddingVertical: space.xs },
  site: { flex: 1, minWidth: 0 },
  siteCell: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  siteText: { flex: 1, minWidth: 0 },
  swatch: { width: 4, alignSelf: 'stretch', borderRadius: 2 },
  num: { width: 84, textAlign: 'right' },
});
