import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from './button';
import { Text } from './text';
import { colors, radii, space } from './theme';

export interface Column<R> {
  key: string;
  title: string;
  /** Cell content; a string is set in text (or mono with `mono`). */
  render: (row: R) => ReactNode;
  mono?: boolean;
  /** Relative width in table mode. */
  flex?: number;
}

export interface RowAction<R> {
  title: string;
  /** Accessible name naming the row, e.g. "Edit site Moorgate". */
  label: (row: R) => string;
  onPress: (row: R) => void;
  /** Highlights the row whose form is open. */
  isActive?: (row: R) => boolean;
}

export interface DataTableProps<R> {
  /** Accessible name of the table / list. */
  label: string;
  rows: R[];
  columns: Column<R>[];
  rowKey: (row: R) => string | number;
  action?: RowAction<R>;
  /** 'table' on wide screens; 'cards' stacks each row as a card (phones, narrow columns). */
  mode: 'table' | 'cards';
  testID?: string;
}

function Cell({ value, mono, bold }: { value: ReactNode; mono?: boolean; bold?: boolean }) {
  if (typeof value === 'string' || typeof value === 'number') {
    return (
      <Text variant="small" mono={mono} bold={bold}>
        {value === '' ? '—' : value}
      </Text>
    );
  }
  return <>{value}</>;
}

/** Rows of a resource: a real table (roles table/row/cell) on wide screens, cards on phones. */
export function DataTable<R>({ label, rows, columns, rowKey, action, mode, testID }: DataTableProps<R>) {
  if (mode === 'cards') {
    const [first, ...rest] = columns;
    return (
      <View role="list" aria-label={label} style={styles.cards} testID={testID}>
        {rows.map((r) => (
          <View key={rowKey(r)} role="listitem" style={[styles.card, action?.isActive?.(r) && styles.active]}>
            <View style={styles.cardHead}>
              <View style={styles.cardTitle}>
                <Cell value={first.render(r)} mono={first.mono} bold />
              </View>
              {action ? <Button title={action.title} label={action.label(r)} kind="secondary" compact onPress={() => action.onPress(r)} /> : null}
            </View>
            {rest.map((c) => (
              <View key={c.key} style={styles.cardRow}>
                <Text variant="small" muted style={styles.cardLabel}>
                  {c.title}
                </Text>
                <View style={styles.cardValue}>
                  <Cell value={c.render(r)} mono={c.mono} />
                </View>
              </View>
            ))}
          </View>
        ))}
      </View>
    );
  }

  return (
    <View role="table" aria-label={label} style={styles.table} testID={testID}>
      <View role="row" style={[styles.row, styles.headRow]}>
        {columns.map((c) => (
          <View key={c.key} role="columnheader" style={[styles.cell, { flex: c.flex ?? 1 }]}>
            <Text variant="caption" bold muted>
              {c.title.toUpperCase()}
            </Text>
          </View>
        ))}
        {action ? (
          <View role="columnheader" style={[styles.cell, styles.actionCell]}>
            <Text variant="caption" bold muted>
              {' '}
            </Text>
          </View>
        ) : null}
      </View>
      {rows.map((r, i) => (
        <View key={rowKey(r)} role="row" style={[styles.row, i % 2 === 1 && styles.zebra, action?.isActive?.(r) && styles.active]}>
          {columns.map((c, ci) => (
            <View key={c.key} role="cell" style={[styles.cell, { flex: c.flex ?? 1 }]}>
              <Cell value={c.render(r)} mono={c.mono} bold={ci === 0} />
            </View>
          ))}
          {action ? (
            <View role="cell" style={[styles.cell, styles.actionCell]}>
              <Button title={action.title} label={action.label(r)} kind="quiet" compact onPress={() => action.onPress(r)} />
            </View>
          ) : null}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, overflow: 'hidden', backgroundColor: colors.surface },
  row: { flexDirection: 'row', alignItems: 'center', borderTopWidth: 1, borderTopColor: colors.rule, minHeight: 44 },
  headRow: { borderTopWidth: 0, backgroundColor: colors.paper, minHeight: 36 },
  zebra: { backgroundColor: '#F8F6F2' },
  active: { backgroundColor: colors.accentSoft },
  cell: { paddingHorizontal: space.md, paddingVertical: space.sm, minWidth: 0 },
  actionCell: { width: 84, alignItems: 'flex-end' },
  cards: { gap: space.sm },
  card: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, padding: space.md, backgroundColor: colors.surface, gap: space.xs },
  cardHead: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, marginBottom: space.xs },
  cardTitle: { flexShrink: 1 },
  cardRow: { flexDirection: 'row', gap: space.sm },
  cardLabel: { width: 110 },
  cardValue: { flex: 1, minWidth: 0 },
});
