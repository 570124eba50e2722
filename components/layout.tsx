import { Children, type ReactNode } from 'react';
import { Platform, ScrollView, StyleSheet, View, type StyleProp, type ViewStyle } from 'react-native';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { Heading, Text } from './text';
import { colors, layout, radii, space } from './theme';

export interface ScreenProps {
  title: string;
  /** One sentence under the title saying what the screen is for. */
  intro?: string;
  /** Buttons shown beside the title (below it on phones). */
  actions?: ReactNode;
  /** Narrow reading column for forms; full width for lists and grids. */
  width?: 'form' | 'full';
  children: ReactNode;
  testID?: string;
}

/** One screen's scrolling body inside the shell: the H1 title, an intro line and the content. */
export function Screen({ title, intro, actions, width = 'full', children, testID }: ScreenProps) {
  const bp = useBreakpoint();
  return (
    <ScrollView
      style={styles.scroll}
      contentContainerStyle={[styles.content, bp.isCompact && styles.contentCompact]}
      keyboardShouldPersistTaps="handled"
      testID={testID}
    >
      <View style={[styles.inner, { maxWidth: width === 'form' ? layout.formMaxWidth : layout.contentMaxWidth }]}>
        <View style={[styles.header, bp.isWide && styles.headerWide]}>
          <View style={styles.titleBlock}>
            <Heading level={1}>{title}</Heading>
            {intro ? (
              <Text muted style={styles.intro}>
                {intro}
              </Text>
            ) : null}
          </View>
          {actions ? <View style={[styles.actions, bp.isWide && styles.actionsWide]}>{actions}</View> : null}
        </View>
        {children}
      </View>
    </ScrollView>
  );
}

/**
 * Lays its children side by side on wide screens (2 columns ≥ 800 px, up to 3 ≥ 1300 px) and
 * stacks them on phones. `weights` sets relative widths, e.g. [3, 2].
 */
export function Columns({
  children,
  max = 3,
  weights,
  style,
  stickyLast,
}: {
  children: ReactNode;
  max?: 1 | 2 | 3;
  weights?: number[];
  style?: StyleProp<ViewStyle>;
  /** Keep the last column in view while the others scroll (an edit form beside a long list). */
  stickyLast?: boolean;
}) {
  const bp = useBreakpoint();
  const items = Children.toArray(children).filter(Boolean);
  const cols = Math.min(bp.columns, max, items.length);
  if (cols <= 1) return <View style={[styles.stack, style]}>{items}</View>;
  return (
    <View style={[styles.row, style]}>
      {items.map((child, i) => (
        <View key={i} style={[{ flex: weights?.[i] ?? 1, minWidth: 0 }, stickyLast && i === items.length - 1 && sticky]}>
          {child}
        </View>
      ))}
    </View>
  );
}

/** A responsive grid of equal cards: 1 column on phones, 2 from 500 px, 3 from 1300 px. */
export function CardGrid({ children }: { children: ReactNode }) {
  const bp = useBreakpoint();
  const perRow = bp.name === 'xwide' ? 3 : bp.name === 'compact' ? 1 : 2;
  const items = Children.toArray(children).filter(Boolean);
  const rows: ReactNode[][] = [];
  for (let i = 0; i < items.length; i += perRow) rows.push(items.slice(i, i + perRow));
  return (
    <View style={styles.stack}>
      {rows.map((row, r) => (
        <View key={r} style={styles.row}>
          {row.map((child, i) => (
            <View key={i} style={styles.gridCell}>
              {child}
            </View>
          ))}
          {Array.from({ length: perRow - row.length }, (_, i) => (
            <View key={`pad-${i}`} style={styles.gridCell} />
          ))}
        </View>
      ))}
    </View>
  );
}

/** A bordered surface with an optional H2 title. */
export function Panel({ title, children, style, aside, testID, label }: { title?: string; children: ReactNode; style?: StyleProp<ViewStyle>; aside?: ReactNode; testID?: string; label?: string }) {
  return (
    <View style={[styles.panel, style]} testID={testID} role={label ? 'region' : undefined} aria-label={label}>
      {title || aside ? (
        <View style={styles.panelHead}>
          {title ? <Heading level={2} style={styles.panelTitle}>{title}</Heading> : <View />}
          {aside}
        </View>
      ) : null}
      {children}
    </View>
  );
}

// CSS position: sticky exists only on web; React Native's types do not list it.
const sticky = Platform.select<ViewStyle>({ web: { position: 'sticky', top: space.md } as unknown as ViewStyle, default: {} });

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: colors.paper },
  content: { padding: space.xl, paddingBottom: space.xxxl },
  contentCompact: { padding: space.lg, paddingBottom: space.xxxl },
  inner: { width: '100%', alignSelf: 'center' },
  header: { marginBottom: space.xl, gap: space.md },
  headerWide: { flexDirection: 'row', alignItems: 'flex-end', justifyContent: 'space-between' },
  titleBlock: { flexShrink: 1 },
  intro: { marginTop: space.xs, maxWidth: 680 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  actionsWide: { justifyContent: 'flex-end' },
  stack: { gap: space.lg },
  row: { flexDirection: 'row', gap: space.lg, alignItems: 'flex-start' },
  gridCell: { flex: 1, minWidth: 0, alignSelf: 'stretch' },
  panel: {
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radii.lg,
    padding: space.lg,
  },
  panelHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', marginBottom: space.md, gap: space.sm },
  panelTitle: { flexShrink: 1 },
});
