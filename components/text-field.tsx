import { forwardRef, useMemo, useState } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import { extraAria, nextId } from './a11y';
import { Text } from './text';
import { colors, fonts, layout, radii, space, type } from './theme';

export interface TextFieldProps extends Omit<TextInputProps, 'style'> {
  /** Visible label, and the input's accessible name (tests use getByLabel with it). */
  label: string;
  error?: string;
  hint?: string;
  required?: boolean;
  mono?: boolean;
  /** Unit shown after the input, e.g. "Hz", "%", "kV". */
  unit?: string;
}

export const TextField = forwardRef<TextInput, TextFieldProps>(function TextField(
  { label, error, hint, required, mono, unit, multiline, onFocus, onBlur, ...rest },
  ref,
) {
  const ids = useMemo(() => ({ err: nextId('err'), hint: nextId('hint') }), []);
  const [focused, setFocused] = useState(false);
  const describedBy = [error ? ids.err : null, hint ? ids.hint : null].filter(Boolean).join(' ');
  return (
    <View style={styles.wrap}>
      <Text variant="small" bold style={styles.label} aria-hidden>
        {label}
        {required ? <Text variant="small" muted>{'  required'}</Text> : null}
      </Text>
      <View style={styles.inputRow}>
        <TextInput
          ref={ref}
          aria-label={unit ? `${label} (${unit})` : label}
          {...extraAria({ invalid: !!error, describedBy: describedBy || undefined, required })}
          placeholderTextColor={colors.inkMuted}
          multiline={multiline}
          {...(rest.secureTextEntry ? { autoCapitalize: 'none' as const, autoCorrect: false, spellCheck: false } : {})}
          onFocus={(e) => {
            setFocused(true);
            onFocus?.(e);
          }}
          onBlur={(e) => {
            setFocused(false);
            onBlur?.(e);
          }}
          {...rest}
          style={[
            styles.input,
            mono && { fontFamily: fonts.mono },
            multiline && styles.multiline,
            focused && styles.focused,
            !!error && styles.invalid,
          ]}
        />
        {unit ? (
          <Text mono variant="small" muted style={styles.unit}>
            {unit}
          </Text>
        ) : null}
      </View>
      {hint && !error ? (
        <Text nativeID={ids.hint} id={ids.hint} variant="caption" muted style={styles.below}>
          {hint}
        </Text>
      ) : null}
      {error ? (
        <Text nativeID={ids.err} id={ids.err} variant="small" color={colors.danger} style={styles.below} role="alert">
          {error}
        </Text>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { marginBottom: space.lg },
  label: { marginBottom: space.xs },
  inputRow: { flexDirection: 'row', alignItems: 'center' },
  input: {
    flex: 1,
    // Web inputs have an intrinsic width; without this they overflow side-by-side rows.
    minWidth: 0,
    width: '100%',
    minHeight: layout.hitTarget,
    borderWidth: 1.5,
    borderColor: colors.ruleStrong,
    borderRadius: radii.md,
    backgroundColor: '#FFFFFF',
    paddingHorizontal: space.md,
    paddingVertical: space.sm,
    color: colors.ink,
    fontFamily: fonts.text,
    ...type.body,
  },
  multiline: { minHeight: 96, textAlignVertical: 'top' },
  focused: { borderColor: colors.accent },
  invalid: { borderColor: colors.danger },
  unit: { marginLeft: space.sm, minWidth: 28 },
  below: { marginTop: space.xs },
});
