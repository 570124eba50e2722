import { Link, type Href } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { AnalysisSummary } from '@/shared/api/scans';
import { errorMessage } from '@/hooks/api-client';
import { isRunning, useAnalysesQuery } from '@/hooks/use-analyses';
import { formatDateTime } from '../format';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Num, Text } from '../text';
import { colors, fonts, radii, space } from '../theme';
import { ProgressBar } from '../upload/progress-bar';
import { StatusTag } from './status';
import { formatSeconds } from './units';

export function analysisHref(a: Pick<AnalysisSummary, 'kind' | 'id' | 'recordingId'>): Href {
  if (a.kind === 'scan') return `/scans/${a.id}` as Href;
  if (a.kind === 'fit') return `/fits/${a.id}` as Href;
  return `/recordings/${a.recordingId}` as Href;
}

const KIND_WORD: Record<AnalysisSummary['kind'], string> = { scan: 'Ambient scan', fit: 'Ring-down fit', ingest: 'Ingest' };

/** One line of what an analysis was asked to do, from its stored settings. */
export function analysisSubject(a: AnalysisSummary): string {
  const s = a.settings as Record<string, unknown>;
  if (a.kind === 'fit' && typeof s.from === 'string' && typeof s.to === 'string') {
    const span = (Date.parse(s.to) - Date.parse(s.from)) / 1000;
    const t = new Date(s.from);
    const hms = `${String(t.getUTCHours()).padStart(2, '0')}:${String(t.getUTCMinutes()).padStart(2, '0')}:${String(t.getUTCSeconds()).padStart(2, '0')}`;
    return `${formatSeconds(span)} from ${hms} UTC · Prony and matrix pencil`;
  }
  if (a.kind === 'scan') {
    const w = typeof s.windowSeconds === 'number' ? `${s.windowSeconds / 60} min windows` : 'windows';
    const st = typeof s.stepSeconds === 'number' ? ` every ${s.stepSeconds} s` : '';
    const m = a.method === 'acf-matrix-pencil' ? 'matrix pencil on autocorrelations' : a.method === 'yule-walker' ? 'Yule-Walker' : (a.method ?? '');
    return `${w}${st} · ${m}${a.windows ? ` · ${a.windows} windows` : ''}`;
  }
  return a.method ?? '';
}

/** Scans and fits (of one recording, or of all), newest first, each a link with its status. */
export function AnalysesList({
  recordingId,
  kind,
  showRecording,
  limit = 20,
  emptyMessage,
}: {
  recordingId?: number;
  kind?: 'scan' | 'fit';
  showRecording?: boolean;
  limit?: number;
  emptyMessage?: string;
}) {
  const q = useAnalysesQuery({ recording: recordingId, kind, limit });
  if (q.isPending) return <LoadingState label="Loading analyses…" />;
  if (q.error) return <ErrorState title="Could not load the analyses" message={errorMessage(q.error)} onRetry={() => void q.refetch()} />;
  const rows = q.data.analyses.filter((a) => a.kind !== 'ingest');
  if (rows.length === 0) return <EmptyState title={kind === 'scan' ? 'No scans yet' : kind === 'fit' ? 'No fits yet' : 'No scans or fits yet'} message={emptyMessage} />;
  return (
    <View role="list" aria-label="Scans and fits" style={styles.list} testID="analyses-list">
      {rows.map((a) => (
        <View key={a.id} role="listitem" style={styles.item} testID={`analysis-${a.id}`}>
          <View style={styles.head}>
            <Link href={analysisHref(a)} style={styles.link} aria-label={`Open ${KIND_WORD[a.kind].toLowerCase()} ${a.id}${showRecording && a.recordingName ? ` of ${a.recordingName}` : ''}`}>
              {`${KIND_WORD[a.kind]} ${a.id}`}
            </Link>
            <StatusTag status={a.status} />
          </View>
          {showRecording && a.recordingName ? (
            <Text variant="small" numberOfLines={1}>
              {a.recordingName}
            </Text>
          ) : null}
          <Text variant="caption" muted>
            {analysisSubject(a)}
          </Text>
          <Num variant="caption" muted>
            {formatDateTime(a.createdAt)}
          </Num>
          {isRunning(a) ? (
            <ProgressBar label={`${KIND_WORD[a.kind]} ${a.id}`} stages={[{ title: 'Run', value: a.progress }]} status={a.status === 'queued' ? 'Waiting for a worker' : 'Running'} />
          ) : null}
          {a.status === 'failed' && a.error ? (
            <Text variant="caption" color={colors.danger}>
              {a.error}
            </Text>
          ) : null}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: space.sm },
  item: { borderWidth: 1, borderColor: colors.rule, borderRadius: radii.md, padding: space.md, backgroundColor: '#FFFFFF', gap: 2 },
  head: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center', gap: space.sm },
  link: { color: colors.accent, fontFamily: fonts.textBold, textDecorationLine: 'underline', fontSize: 15, flexShrink: 1 },
});
