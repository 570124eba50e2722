import { StyleSheet, View } from 'react-native';
import type { ChannelQuality, RecordingDetail } from '@/shared/api/recordings';
import { formatDateTime, formatRate } from '../format';
import { Panel } from '../layout';
import { Num, Text } from '../text';
import { colors, radii, space } from '../theme';
import { FORMAT_WORD } from './recordings-table';
import { StatusTag } from './status';
import { epochOf, formatBytes, formatDuration, formatUtcTime, unitSymbol } from './units';

function Fact({ label, value, mono = true, wide }: { label: string; value: string; mono?: boolean; wide?: boolean }) {
  return (
    <View style={[styles.fact, wide && styles.factWide]}>
      <Text variant="caption" muted>
        {label}
      </Text>
      {mono ? <Num variant="small">{value}</Num> : <Text variant="small">{value}</Text>}
    </View>
  );
}

const sameDay = (a: number, b: number) => new Date(a * 1000).toISOString().slice(0, 10) === new Date(b * 1000).toISOString().slice(0, 10);

const pct = (n: number, of: number) => (of > 0 ? `${((100 * n) / of).toFixed(n === 0 ? 0 : 2)} %` : '—');

/** What the recording is: its span, rate, size, who uploaded it, and the whole-file data quality. */
export function RecordingFacts({ recording: r }: { recording: RecordingDetail }) {
  const start = epochOf(r.startTime);
  const end = epochOf(r.endTime);
  const q = r.quality;
  return (
    <Panel title="Recording" label="Recording facts" aside={<StatusTag status={r.status} />} testID="recording-facts">
      <View style={styles.grid}>
        <Fact label="Starts" value={Number.isFinite(start) ? formatUtcTime(start, true) : '—'} wide />
        <Fact label="Ends" value={Number.isFinite(end) ? formatUtcTime(end, sameDay(start, end) ? false : true) : '—'} wide />
        <Fact label="Length" value={formatDuration(Number.isFinite(end - start) ? end - start : null)} />
        <Fact label="Reporting rate" value={r.rate ? formatRate(r.rate) : '—'} />
        <Fact label="Channels" value={r.channelCount != null ? String(r.channelCount) : '—'} />
        <Fact label="Frames per channel" value={r.sampleCount != null ? r.sampleCount.toLocaleString('en-US') : '—'} />
        <Fact label="File" value={`${FORMAT_WORD[r.format]}, ${formatBytes(r.sizeBytes)}`} mono={false} />
        <Fact label="Uploaded" value={`${formatDateTime(r.uploadedAt)}${r.uploadedBy ? ` by ${r.uploadedBy.displayName}` : ''}`} mono={false} />
      </View>
      {q ? (
        <View style={styles.quality}>
          <Text variant="small" bold>
            Data quality
          </Text>
          <Text variant="small" testID="recording-quality">
            {`${q.rows.toLocaleString('en-US')} rows kept · ${q.duplicates} duplicate rows dropped · ${q.gaps} gaps missing ${q.missingFrames} frames (${pct(q.missingFrames, q.rows + q.missingFrames)})`}
          </Text>
        </View>
      ) : null}
      {r.status === 'failed' && r.error ? (
        <View role="alert" style={styles.error}>
          <Text variant="small" bold color={colors.danger}>
            The ingest stopped
          </Text>
          <Num variant="small">{r.error}</Num>
        </View>
      ) : null}
      <Text variant="caption" muted style={styles.checksum} numberOfLines={1}>
        {`sha256 ${r.checksum}`}
      </Text>
    </Panel>
  );
}

/** Words for one channel's quality: "clean", or what is wrong with it and how much. */
export function qualityWords(q: ChannelQuality | null): { text: string; clean: boolean } {
  if (!q) return { text: 'not checked', clean: false };
  const parts: string[] = [];
  if (q.dropouts) parts.push(`${q.dropouts} missing (${pct(q.dropouts, q.samples)})`);
  if (q.gaps) parts.push(`${q.gaps} gaps, longest ${q.longestGap} samples`);
  if (q.flatLine) parts.push(`${q.flatLine} flat-line`);
  if (q.outliers) parts.push(`${q.outliers} outliers`);
  if (q.duplicates) parts.push(`${q.duplicates} duplicates`);
  return parts.length ? { text: parts.join(' · '), clean: false } : { text: 'clean', clean: true };
}

/** Each channel with its kind, unit, source column and data-quality counts. */
export function ChannelsPanel({ recording }: { recording: RecordingDetail }) {
  return (
    <Panel title="Channels" label="Channels and their data quality" testID="channels-panel">
      <View role="list" aria-label="Channels" style={styles.channels}>
        {recording.channels.map((c) => {
          const w = qualityWords(c.quality);
          return (
            <View key={c.channelId} role="listitem" style={styles.channel}>
              <View style={styles.channelHead}>
                <Num variant="small" bold style={styles.channelName}>
                  {c.name}
                </Num>
                <Text variant="caption" muted>
                  {`${c.kind}, ${unitSymbol(c.unit)}`}
                </Text>
              </View>
              {c.sourceName !== c.name ? (
                <Text variant="caption" muted>
                  {`from column “${c.sourceName}”`}
                </Text>
              ) : null}
              <Text variant="caption" color={w.clean ? colors.accent : colors.ink}>
                {w.clean ? '✓ clean' : w.text}
              </Text>
            </View>
          );
        })}
      </View>
    </Panel>
  );
}

const styles = StyleSheet.create({
  grid: { flexDirection: 'row', flexWrap: 'wrap', rowGap: space.sm },
  fact: { width: '50%', paddingRight: space.sm, gap: 1 },
  factWide: { width: '100%' },
  quality: { marginTop: space.md, gap: space.xxs },
  error: { marginTop: space.md, padding: space.sm, backgroundColor: colors.dangerSoft, borderRadius: radii.sm, gap: space.xxs },
  checksum: { marginTop: space.md },
  channels: { gap: 0 },
  channel: { paddingVertical: space.sm, borderTopWidth: 1, borderTopColor: '#E6E1D7', gap: 1 },
  channelHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'baseline', gap: space.sm },
  channelName: { flexShrink: 1 },
});
