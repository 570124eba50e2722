import { StyleSheet, View } from 'react-native';
import { Text } from '../text';
import { colors, radii, space } from '../theme';

export interface ProgressStage {
  /** Short name under its part of the bar, e.g. "Send". */
  title: string;
  /** 0..1, or null while it has not started. */
  value: number | null;
}

export interface ProgressBarProps {
  /** Accessible name, e.g. "Upload of tarrow-ambient.csv". */
  label: string;
  /** One part per stage, filled left to right (a single stage is a plain bar). */
  stages: ProgressStage[];
  /** What is happening now, in words (also the accessible value text). */
  status: string;
  tone?: 'running' | 'done' | 'failed';
  testID?: string;
}

/**
 * A progress bar in stages (e.g. send the bytes, then check and store them). The whole is one
 * progressbar to assistive technology: its value is the mean of the stages, its text the status.
 */
export function ProgressBar({ label, stages, status, tone = 'running', testID }: ProgressBarProps) {
  const overall = stages.reduce((s, st) => s + (st.value ?? 0), 0) / Math.max(1, stages.length);
  // Floor, so 100 % means every stage is complete (a stage at 99.6 % still reads 99 %).
  const pct = Math.floor(Math.min(1, Math.max(0, overall)) * 100 + 1e-9);
  const fill = tone === 'failed' ? colors.danger : colors.accent;
  return (
    <View
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={pct}
      aria-valuetext={`${pct} %: ${status}`}
      testID={testID}
      style={styles.wrap}
    >
      <View style={styles.track}>
        {stages.map((st, i) => (
          <View key={st.title} style={[styles.part, i > 0 && styles.partGap]}>
            <View style={styles.partTrack}>
              <View style={[styles.partFill, { width: `${Math.min(1, Math.max(0, st.value ?? 0)) * 100}%`, backgroundColor: fill }]} />
            </View>
            {stages.length > 1 ? (
              <Text variant="caption" muted={st.value == null} bold={st.value != null && st.value < 1} style={styles.partTitle}>
                {`${i + 1} ${st.title}`}
              </Text>
            ) : null}
          </View>
        ))}
      </View>
      <View style={styles.statusRow}>
        <Text variant="small" color={tone === 'failed' ? colors.danger : colors.ink} style={styles.status}>
          {status}
        </Text>
        <Text variant="small" mono muted>
          {`${pct} %`}
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs, marginVertical: space.sm },
  track: { flexDirection: 'row' },
  part: { flex: 1, minWidth: 0 },
  partGap: { marginLeft: space.xs },
  partTrack: { height: 10, borderRadius: radii.pill, backgroundColor: '#E6E1D7', overflow: 'hidden' },
  partFill: { height: 10, borderRadius: radii.pill },
  partTitle: { marginTop: space.xxs },
  statusRow: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'baseline', gap: space.sm },
  status: { flexShrink: 1 },
});
