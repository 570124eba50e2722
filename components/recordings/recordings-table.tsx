import { Link, type Href } from 'expo-router';
import { useMemo } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { RecordingSummary } from '@/shared/api/recordings';
import { Button } from '../button';
import { formatDateTime, formatRate } from '../format';
import { SelectField } from '../select-field';
import { Num, Text } from '../text';
import { colors, fonts, radii, space } from '../theme';
import { StatusTag } from './status';
import { useTableState, type SortColumn, type SortSpec } from './table-logic';
import { formatBytes, formatDuration } from './units';

const spanOf = (r: RecordingSummary) => (r.startTime && r.endTime ? (Date.parse(r.endTime) - Date.parse(r.startTime)) / 1000 : null);

const SORTS: SortColumn<RecordingSummary>[] = [
  { key: 'file', title: 'File', value: (r) => r.fileName },
  { key: 'start', title: 'Recorded', value: (r) => (r.startTime ? Date.parse(r.startTime) : null), firstDirection: 'descending' },
  { key: 'length', title: 'Length', value: spanOf, firstDirection: 'descending' },
  { key: 'channels', title: 'Channels', value: (r) => r.channelCount, firstDirection: 'descending' },
  { key: 'status', title: 'Status', value: (r) => r.status },
  { key: 'uploaded', title: 'Uploaded', value: (r) => Date.parse(r.uploadedAt), firstDirection: 'descending' },
];

const SORT_OPTIONS = [
  { value: 'uploaded:descending', label: 'Newest upload first' },
  { value: 'uploaded:ascending', label: 'Oldest upload first' },
  { value: 'start:descending', label: 'Latest recorded first' },
  { value: 'start:ascending', label: 'Earliest recorded first' },
  { value: 'file:ascending', label: 'File name, A to Z' },
  { value: 'file:descending', label: 'File name, Z to A' },
  { value: 'length:descending', label: 'Longest first' },
  { value: 'length:ascending', label: 'Shortest first' },
  { value: 'channels:descending', label: 'Most channels first' },
  { value: 'status:ascending', label: 'By status' },
];

const href = (r: RecordingSummary) => `/recordings/${r.id}` as Href;

export interface RecordingsTableProps {
  recordings: RecordingSummary[];
  mode: 'table' | 'cards';
  pageSize: number;
}

/** The recordings, sortable by any column and paged; a table on wide screens, cards on phones. */
export function RecordingsTable({ recordings, mode, pageSize }: RecordingsTableProps) {
  const initial: SortSpec = { key: 'uploaded', direction: 'descending' };
  const t = useTableState({ rows: recordings, columns: SORTS, initialSort: initial, pageSize });
  const sortValue = t.sort ? `${t.sort.key}:${t.sort.direction}` : '';

  const pager = (
    <View style={styles.pager} role="navigation" aria-label="Pages of recordings">
      <Num variant="small" muted testID="recordings-page-info">
        {`${t.page.first}–${t.page.last} of ${t.page.total}`}
      </Num>
      <View style={styles.pagerButtons}>
        <Button title="Previous" label="Previous page of recordings" kind="secondary" compact disabled={t.page.page === 0} onPress={() => t.setPage(t.page.page - 1)} />
        <Button
          title="Next"
          label="Next page of recordings"
          kind="secondary"
          compact
          disabled={t.page.page >= t.page.pageCount - 1}
          onPress={() => t.setPage(t.page.page + 1)}
        />
      </View>
    </View>
  );

  if (mode === 'cards') {
    return (
      <View style={styles.stack}>
        <SelectField
          label="Sort by"
          accessibleLabel="Sort recordings by"
          value={sortValue}
          options={SORT_OPTIONS}
          onChange={(v) => {
            const [key, direction] = v.split(':');
            t.setSort({ key, direction: direction as SortSpec['direction'] });
          }}
        />
        <View role="list" aria-label="Recordings" style={styles.cards} testID="recordings-list">
          {t.rows.map((r) => (
            <RecordingCard key={r.id} r={r} />
          ))}
        </View>
        {t.page.pageCount > 1 ? pager : null}
      </View>
    );
  }

  return (
    <View style={styles.stack}>
      <View role="table" aria-label="Recordings" style={styles.table} testID="recordings-list">
        <View role="row" style={[styles.row, styles.headRow]}>
          {SORTS.map((c) => {
            const active = t.sort?.key === c.key;
            const dir = active ? t.sort!.direction : undefined;
            return (
              <View
                key={c.key}
                role="columnheader"
                style={[styles.cell, { flex: FLEX[c.key] }]}
                {...({ 'aria-sort': dir ?? 'none' } as object)}
              >
                <Pressable
                  role="button"
                  aria-label={`Sort by ${c.title.toLowerCase()}${active ? (dir === 'ascending' ? ', now ascending' : ', now descending') : ''}`}
                  onPress={() => t.toggleSort(c.key)}
                  style={({ pressed }) => [styles.sortButton, pressed && styles.pressed]}
                >
                  <Text variant="caption" bold color={active ? colors.accent : colors.inkMuted} numberOfLines={1}>
                    {c.title.toUpperCase()}
                    <Text aria-hidden variant="caption" color={active ? colors.accent : colors.ruleStrong}>
                      {dir === 'ascending' ? ' ▴' : dir === 'descending' ? ' ▾' : ' ▴▾'}
                    </Text>
                  </Text>
                </Pressable>
              </View>
            );
          })}
        </View>
        {t.rows.map((r, i) => {
          const span = spanOf(r);
          return (
            <View key={r.id} role="row" style={[styles.row, i % 2 === 1 && styles.zebra]} testID={`recording-row-${r.id}`}>
              <View role="cell" style={[styles.cell, { flex: FLEX.file }]}>
                <Link href={href(r)} style={styles.link} aria-label={`Open recording ${r.fileName}`}>
                  {r.fileName}
                </Link>
                <Text variant="caption" muted numberOfLines={1}>
                  {`${FORMAT_WORD[r.format]} · ${formatBytes(r.sizeBytes)}${r.rate ? ` · ${formatRate(r.rate)}` : ''}`}
                </Text>
              </View>
              <View role="cell" style={[styles.cell, { flex: FLEX.start }]}>
                <DateCell iso={r.startTime} />
              </View>
              <View role="cell" style={[styles.cell, { flex: FLEX.length }]}>
                <Num variant="small">{formatDuration(span)}</Num>
              </View>
              <View role="cell" style={[styles.cell, { flex: FLEX.channels }]}>
                <Num variant="small">{r.channelCount ?? '—'}</Num>
              </View>
              <View role="cell" style={[styles.cell, { flex: FLEX.status }]}>
                <StatusTag status={r.status} />
              </View>
              <View role="cell" style={[styles.cell, { flex: FLEX.uploaded }]}>
                <DateCell iso={r.uploadedAt} />
                <Text variant="caption" muted numberOfLines={1}>
                  {r.uploadedBy?.displayName ?? '—'}
                </Text>
              </View>
            </View>
          );
        })}
      </View>
      {t.page.pageCount > 1 ? pager : null}
    </View>
  );
}

const FLEX: Record<string, number> = { file: 2.3, start: 1.35, length: 1.3, channels: 1.25, status: 1.1, uploaded: 1.45 };

/** Date over time of day (UTC), so a narrow column never breaks a timestamp in the middle. */
function DateCell({ iso }: { iso: string | null }) {
  const text = formatDateTime(iso);
  const [date, ...rest] = text.split(' ');
  return (
    <View>
      <Num variant="small">{date}</Num>
      {rest.length ? (
        <Num variant="caption" muted>
          {rest.join(' ')}
        </Num>
      ) : null}
    </View>
  );
}

export const FORMAT_WORD: Record<RecordingSummary['format'], string> = {
  csv: 'CSV',
  'comtrade-ascii': 'COMTRADE ASCII',
  'comtrade-binary': 'COMTRADE binary',
};

function RecordingCard({ r }: { r: RecordingSummary }) {
  const span = spanOf(r);
  return (
    <View role="listitem" style={styles.card} testID={`recording-row-${r.id}`}>
      <View style={styles.cardHead}>
        <Link href={href(r)} style={[styles.link, styles.cardLink]} aria-label={`Open recording ${r.fileName}`}>
          {r.fileName}
        </Link>
        <StatusTag status={r.status} />
      </View>
      <Num variant="small">{`${formatDateTime(r.startTime)} · ${formatDuration(span)}`}</Num>
      <Text variant="caption" muted>
        {`${r.channelCount ?? '—'} channels · ${r.rate ? formatRate(r.rate) : '—'} · ${formatBytes(r.sizeBytes)} · uploaded ${formatDateTime(r.uploadedAt)}${r.uploadedBy ? ` by ${r.uploadedBy.displayName}` : ''}`}
      </Text>
      {r.status === 'failed' && r.error ? (
        <Text variant="caption" color={colors.danger}>
          {r.error}
        </Text>
      ) : null}
    </View>
  );
}

export function useRecordingPageSize(wide: boolean): number {
  return useMemo(() => (wide ? 12 : 8), [wide]);
}

const styles = StyleSheet.create({
  stack: { gap: space.md },
  table: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, overflow: 'hidden', backgroundColor: colors.surface },
  row: { flexDirection: 'row', alignItems: 'center', borderTopWidth: 1, borderTopColor: colors.rule, minHeight: 52 },
  headRow: { borderTopWidth: 0, backgroundColor: colors.paper, minHeight: 40 },
  zebra: { backgroundColor: '#F8F6F2' },
  cell: { paddingHorizontal: space.md, paddingVertical: space.sm, minWidth: 0 },
  sortButton: { flexDirection: 'row', alignItems: 'center', minHeight: 32, borderRadius: radii.sm },
  pressed: { backgroundColor: colors.accentSoft },
  link: { color: colors.accent, fontFamily: fonts.textBold, textDecorationLine: 'underline', fontSize: 15 },
  cards: { gap: space.sm },
  card: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, padding: space.md, backgroundColor: colors.surface, gap: space.xs },
  cardHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  cardLink: { flexShrink: 1 },
  pager: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, flexWrap: 'wrap' },
  pagerButtons: { flexDirection: 'row', gap: space.sm },
});
