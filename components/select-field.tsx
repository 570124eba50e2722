import { Pressable, StyleSheet, View } from 'react-native';
import type { SelectFieldProps } from './select-field.types';
import { Text } from './text';
import { colors, layout, radii, space } from './theme';

export type { SelectFieldProps, SelectOption } from './select-field.types';

/** Native: the choices as a radio group (no platform picker needed for the short lists we have). */
export function SelectField({ label, accessibleLabel, value, options, onChange, onBlur, error, required, disabled, testID }: SelectFieldProps) {
  return (
    <View style={styles.wrap} testID={testID}>
      <Text variant="small" bold style={styles.label}>
        {label}
        {required ? <Text variant="small" muted>{'  required'}</Text> : null}
      </Text>
      <View role="radiogroup" aria-label={accessibleLabel ?? label} style={styles.group}>
        {options.map((o) => {
          const selected = o.value === value;
          return (
            <Pressable
              key={o.value}
              role="radio"
              aria-checked={selected}
              aria-label={o.label}
              disabled={disabled}
              onPress={() => {
                onChange(o.value);
                onBlur?.();
              }}
              style={[styles.option, selected && styles.selected]}
            >
              <Text variant="small" bold={selected} color={selected ? colors.accent : colors.ink}>
                {selected ? '● ' : '○ '}
                {o.label}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text variant="small" color={colors.danger} style={styles.below} role="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { marginBottom: space.lg },
  label: { marginBottom: space.xs },
  group: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  option: {
    minHeight: layout.hitTarget,
    paddingHorizontal: space.md,
    justifyContent: 'center',
    borderWidth: 1.5,
    borderColor: colors.ruleStrong,
    borderRadius: radii.md,
  },
  selected: { borderColor: colors.accent, backgroundColor: colors.accentSoft },
  below: { marginTop: space.xs },
});
