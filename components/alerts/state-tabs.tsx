// A row of tabs choosing which alerts to list (open / acknowledged / cleared), with counts.
import { Pressable, StyleSheet, View } from 'react-native';
import { extraAria } from '../a11y';
import { Text } from '../text';
import { colors, radii, space } from '../theme';

export interface TabItem<K extends string> {
  key: K;
  title: string;
  count?: number | null;
}

export function Tabs<K extends string>({ items, value, onChange, label }: { items: TabItem<K>[]; value: K; onChange: (k: K) => void; label: string }) {
  return (
    <View role="tablist" aria-label={label} style={styles.row}>
      {items.map((it) => {
        const on = it.key === value;
        return (
          <Pressable
            key={it.key}
            role="tab"
            aria-selected={on}
            {...extraAria({ current: on ? 'true' : undefined })}
            onPress={() => onChange(it.key)}
            testID={`tab-${it.key}`}
            style={({ pressed }) => [styles.tab, on && styles.on, pressed && !on && styles.pressed]}
          >
            <Text variant="small" bold color={on ? colors.onAccent : colors.ink}>
              {it.title}
              {it.count != null ? <Text variant="small" color={on ? colors.onAccent : colors.inkMuted}>{`  ${it.count}`}</Text> : null}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.xs, padding: 3, backgroundColor: colors.surface, borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, alignSelf: 'flex-start' },
  tab: { minHeight: 38, paddingHorizontal: space.md, borderRadius: radii.sm + 2, alignItems: 'center', justifyContent: 'center' },
  on: { backgroundColor: colors.accent },
  pressed: { backgroundColor: colors.accentSoft },
});
