import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from '../text';
import { colors, layout, radii, space } from '../theme';

export interface MethodOption {
  value: string;
  title: string;
  detail?: string;
}

/** A small segmented choice (radio group): which method's reconstruction and modes are drawn. */
export function MethodPicker({ label, options, value, onChange }: { label: string; options: MethodOption[]; value: string; onChange: (v: string) => void }) {
  return (
    <View style={styles.wrap}>
      <Text variant="small" bold style={styles.label}>
        {label}
      </Text>
      <View role="radiogroup" aria-label={label} style={styles.group}>
        {options.map((o, i) => {
          const on = o.value === value;
          return (
            <Pressable
              key={o.value}
              role="radio"
              aria-checked={on}
              aria-label={o.title}
              onPress={() => onChange(o.value)}
              style={[styles.option, i > 0 && styles.notFirst, on && styles.on]}
              testID={`method-${o.value}`}
            >
              <Text variant="small" bold color={on ? colors.onAccent : colors.ink}>
                {o.title}
              </Text>
              {o.detail ? (
                <Text variant="caption" mono color={on ? colors.onAccent : colors.inkMuted}>
                  {o.detail}
                </Text>
              ) : null}
            </Pressable>
          );
        })}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { marginBottom: space.md },
  label: { marginBottom: space.xs },
  group: { flexDirection: 'row', borderWidth: 1.5, borderColor: colors.accent, borderRadius: radii.md, overflow: 'hidden', alignSelf: 'flex-start' },
  option: { minHeight: layout.hitTarget, paddingHorizontal: space.md, paddingVertical: space.xs, justifyContent: 'center', backgroundColor: colors.surface },
  notFirst: { borderLeftWidth: 1.5, borderLeftColor: colors.accent },
  on: { backgroundColor: colors.accent },
});
