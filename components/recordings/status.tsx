import { StyleSheet, View } from 'react-native';
import type { AnalysisSummary } from '@/shared/api/scans';
import type { RecordingSummary } from '@/shared/api/recordings';
import { Text } from '../text';
import { colors, radii, space } from '../theme';

// Status of a recording or an analysis as a mark and a word. Deliberately not the damping-band
// shapes (○ ◇ ▲ ∿): those mean damping only.
const LOOK = {
  ready: { mark: '✓', word: 'ready', color: colors.accent, bg: colors.accentSoft },
  done: { mark: '✓', word: 'done', color: colors.accent, bg: colors.accentSoft },
  ingesting: { mark: '…', word: 'ingesting', color: colors.ink, bg: '#ECE8DF' },
  uploaded: { mark: '…', word: 'waiting', color: colors.ink, bg: '#ECE8DF' },
  queued: { mark: '…', word: 'queued', color: colors.ink, bg: '#ECE8DF' },
  running: { mark: '…', word: 'running', color: colors.ink, bg: '#ECE8DF' },
  failed: { mark: '✕', word: 'failed', color: colors.danger, bg: colors.dangerSoft },
} as const;

export type StatusName = RecordingSummary['status'] | AnalysisSummary['status'];

export function StatusTag({ status, detail }: { status: StatusName; detail?: string }) {
  const l = LOOK[status];
  return (
    <View style={[styles.tag, { backgroundColor: l.bg }]} testID={`status-${status}`}>
      <Text variant="caption" bold color={l.color}>
        <Text aria-hidden variant="caption" bold color={l.color}>{`${l.mark} `}</Text>
        {`${l.word}${detail ? ` ${detail}` : ''}`}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  tag: { alignSelf: 'flex-start', borderRadius: radii.sm, paddingHorizontal: space.sm, paddingVertical: 1 },
});
