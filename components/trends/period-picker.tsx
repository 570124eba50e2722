// Quick period choices (buttons that say which one is chosen), for Trends and the transfer study.
import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from '../text';
import { colors, radii, space } from '../theme';

export interface PeriodChoice {
  key: string;
  /** Visible, short: "24 h". */
  title: string;
  /** Accessible name: "Last 24 hours". */
  label: string;
  ms: number;
}

export const HOUR_MS = 3600_000;
export const DAY_MS = 24 * HOUR_MS;

export function PeriodPicker({ choices, value, onChange, label }: { choices: PeriodChoice[]; value: string | null; onChange: (c: PeriodChoice) => void; label: string }) {
  return (
    <View role="group" aria-label={label} style={styles.row}>
      {choices.map((c) => {
        const on = c.key === value;
        return (
          <Pressable
            key={c.key}
            role="button"
            aria-label={c.label}
            aria-pressed={on}
            onPress={() => onChange(c)}
            style={({ pressed }) => [styles.btn, on && styles.on, pressed && !on && styles.pressed]}
            testID={`period-${c.key}`}
          >
            <Text variant="small" bold color={on ? colors.onAccent : colors.accent}>
              {c.title}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  btn: { minHeight: 38, minWidth: 52, paddingHorizontal: space.md, borderRadius: radii.md, borderWidth: 1.5, borderColor: colors.accent, backgroundColor: colors.surface, alignItems: 'center', justifyContent: 'center' },
  on: { backgroundColor: colors.accent },
  pressed: { backgroundColor: colors.accentSoft },
});
