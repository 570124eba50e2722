import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from '../text';
import { colors, layout, radii, space } from '../theme';

export interface SiteGroupPickerProps {
  label: string;
  /** Shown in each chip's accessible name: "Moorgate in group A". */
  groupName: string;
  sites: { code: string; name: string }[];
  value: string[];
  onChange: (codes: string[]) => void;
  error?: string;
}

/** A set of site codes, as toggle chips (checkboxes to assistive technology). */
export function SiteGroupPicker({ label, groupName, sites, value, onChange, error }: SiteGroupPickerProps) {
  return (
    <View style={styles.wrap}>
      <Text variant="small" bold style={styles.label}>
        {label}
      </Text>
      <View role="group" aria-label={label} style={styles.chips}>
        {sites.map((s) => {
          const on = value.includes(s.code);
          return (
            <Pressable
              key={s.code}
              role="checkbox"
              aria-checked={on}
              aria-label={`${s.name} in ${groupName}`}
              onPress={() => onChange(on ? value.filter((c) => c !== s.code) : [...value, s.code])}
              style={[styles.chip, on && styles.on]}
            >
              <Text variant="small" bold={on} color={on ? colors.accent : colors.ink}>
                {on ? '✓ ' : ''}
                {s.name}
              </Text>
            </Pressable>
          );
        })}
      </View>
      {error ? (
        <Text variant="small" color={colors.danger} role="alert" style={styles.err}>
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { marginBottom: space.lg },
  label: { marginBottom: space.xs },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs },
  chip: {
    minHeight: 36,
    minWidth: layout.hitTarget,
    paddingHorizontal: space.md,
    justifyContent: 'center',
    borderWidth: 1.5,
    borderColor: colors.rule,
    borderRadius: radii.pill,
    backgroundColor: '#FFFFFF',
  },
  on: { borderColor: colors.accent, backgroundColor: colors.accentSoft },
  err: { marginTop: space.xs },
});
