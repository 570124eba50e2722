import { Children, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { space } from '../theme';

/** Short fields side by side (e.g. lowest and highest frequency); stacked on phones. */
export function FieldRow({ children }: { children: ReactNode }) {
  const bp = useBreakpoint();
  if (bp.isCompact) return <>{children}</>;
  return (
    <View style={styles.row}>
      {Children.toArray(children).map((c, i) => (
        <View key={i} style={styles.cell}>
          {c}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', gap: space.md },
  cell: { flex: 1, minWidth: 0 },
});
