import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import { extraAria, nextId } from './a11y';
import type { SelectFieldProps } from './select-field.types';
import { Text } from './text';
import { colors, fonts, layout, radii, space, type } from './theme';

export type { SelectFieldProps, SelectOption } from './select-field.types';

/** Web: a real <select>, so keyboard, screen readers and getByLabel work as users expect. */
export function SelectField({ label, accessibleLabel, value, options, onChange, onBlur, error, placeholder, required, disabled, testID }: SelectFieldProps) {
  const errId = useMemo(() => nextId('err'), []);
  const hasValue = value != null && value !== '';
  return (
    <View style={styles.wrap}>
      <Text variant="small" bold style={styles.label} aria-hidden>
        {label}
        {required ? <Text variant="small" muted>{'  required'}</Text> : null}
      </Text>
      <select
        aria-label={accessibleLabel ?? label}
        {...(extraAria({ invalid: !!error, describedBy: error ? errId : undefined, required }) as object)}
        data-testid={testID}
        disabled={disabled}
        value={hasValue ? value : ''}
        onChange={(e) => onChange(e.target.value)}
        onBlur={onBlur}
        style={{
          minHeight: layout.hitTarget,
          border: `1.5px solid ${error ? colors.danger : colors.ruleStrong}`,
          borderRadius: radii.md,
          background: '#FFFFFF',
          color: colors.ink,
          padding: `${space.sm}px ${space.md}px`,
          fontFamily: fonts.text,
          fontSize: type.body.fontSize,
          width: '100%',
        }}
      >
        {!hasValue || placeholder ? (
          <option value="" disabled>
            {placeholder ?? 'Choose…'}
          </option>
        ) : null}
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {error ? (
        <Text nativeID={errId} id={errId} variant="small" color={colors.danger} style={styles.below} role="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { marginBottom: space.lg },
  label: { marginBottom: space.xs },
  below: { marginTop: space.xs },
});
