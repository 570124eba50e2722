import { ActivityIndicator, Pressable, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';
import { Text } from './text';
import { colors, layout, radii, space } from './theme';

export type ButtonKind = 'primary' | 'secondary' | 'quiet' | 'danger';

export interface ButtonProps {
  /** Visible text; also the accessible name unless `label` is given. */
  title: string;
  onPress?: () => void;
  kind?: ButtonKind;
  /** Accessible name when it must say more than the visible text (e.g. "Edit site Moorgate"). */
  label?: string;
  disabled?: boolean;
  /** Shows a spinner and blocks presses while a request is in flight. */
  busy?: boolean;
  compact?: boolean;
  testID?: string;
  style?: StyleProp<ViewStyle>;
}

const kinds: Record<ButtonKind, { bg: string; fg: string; border: string; pressed: string }> = {
  primary: { bg: colors.accent, fg: colors.onAccent, border: colors.accent, pressed: '#0B5552' },
  secondary: { bg: colors.surface, fg: colors.accent, border: colors.accent, pressed: colors.accentSoft },
  quiet: { bg: 'transparent', fg: colors.accent, border: 'transparent', pressed: colors.accentSoft },
  danger: { bg: colors.surface, fg: colors.danger, border: colors.danger, pressed: colors.dangerSoft },
};

export function Button({ title, onPress, kind = 'primary', label, disabled, busy, compact, testID, style }: ButtonProps) {
  const k = kinds[kind];
  const inactive = disabled || busy;
  return (
    <Pressable
      role="button"
      // The visible title names the button; an explicit label only when it must say more.
      aria-label={label}
      aria-disabled={inactive || undefined}
      aria-busy={busy || undefined}
      disabled={inactive}
      onPress={onPress}
      testID={testID}
      style={({ pressed }) => [
        styles.base,
        compact && styles.compact,
        { backgroundColor: pressed ? k.pressed : k.bg, borderColor: k.border },
        inactive && styles.inactive,
        style,
      ]}
    >
      <View style={styles.row}>
        {busy ? <ActivityIndicator size="small" color={k.fg} style={styles.spinner} /> : null}
        <Text bold variant={compact ? 'small' : 'body'} color={k.fg} numberOfLines={1}>
          {title}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: layout.hitTarget,
    paddingHorizontal: space.lg,
    borderRadius: radii.md,
    borderWidth: 1.5,
    alignItems: 'center',
    justifyContent: 'center',
    alignSelf: 'flex-start',
  },
  compact: { minHeight: 36, paddingHorizontal: space.md },
  inactive: { opacity: 0.55 },
  row: { flexDirection: 'row', alignItems: 'center' },
  spinner: { marginRight: space.sm },
});
