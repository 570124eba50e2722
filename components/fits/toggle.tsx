import type { ReactNode } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from '../text';
import { colors, layout, radii, space } from '../theme';

export interface ToggleProps {
  value: boolean;
  onChange: (on: boolean) => void;
  /** Visible words and the accessible name (unless `accessibleLabel`). */
  label: string;
  accessibleLabel?: string;
  hint?: string;
  /** Extra content beside the words (e.g. a band chip). */
  children?: ReactNode;
  disabled?: boolean;
  testID?: string;
}

/** An on/off switch with its words beside it; Space or Enter flips it (a real switch role). */
export function Toggle({ value, onChange, label, accessibleLabel, hint, children, disabled, testID }: ToggleProps) {
  return (
    <Pressable
      role="switch"
      aria-checked={value}
      aria-label={accessibleLabel ?? label}
      aria-disabled={disabled || undefined}
      disabled={disabled}
      onPress={() => onChange(!value)}
      testID={testID}
      style={({ pressed }) => [styles.row, pressed && styles.pressed]}
    >
      <View style={[styles.track, value ? styles.trackOn : styles.trackOff]} aria-hidden>
        <View style={[styles.knob, value ? styles.knobOn : styles.knobOff]} />
      </View>
      <View style={styles.words}>
        <View style={styles.labelRow}>
          <Text variant="small" bold>
            {label}
          </Text>
          {children}
        </View>
        {hint ? (
          <Text variant="caption" muted>
            {hint}
          </Text>
        ) : null}
      </View>
      <Text variant="caption" bold color={value ? colors.accent : colors.inkMuted} aria-hidden style={styles.state}>
        {value ? 'on' : 'off'}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'center', gap: space.md, minHeight: layout.hitTarget, paddingVertical: space.xs, borderRadius: radii.md, marginBottom: space.sm },
  pressed: { backgroundColor: colors.accentSoft },
  track: { width: 40, height: 24, borderRadius: 12, borderWidth: 1.5, justifyContent: 'center', paddingHorizontal: 2 },
  trackOn: { backgroundColor: colors.accent, borderColor: colors.accent },
  trackOff: { backgroundColor: '#FFFFFF', borderColor: colors.ruleStrong },
  knob: { width: 17, height: 17, borderRadius: 9 },
  knobOn: { backgroundColor: '#FFFFFF', alignSelf: 'flex-end' },
  knobOff: { backgroundColor: colors.ruleStrong, alignSelf: 'flex-start' },
  words: { flex: 1, minWidth: 0 },
  labelRow: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm },
  state: { width: 22, textAlign: 'right' },
});
