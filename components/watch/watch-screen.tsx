// Watch (home): every tracked mode now. Open alerts first, then a stale-data warning when a track
// has had no estimate for longer than its scan step allows, then one card per track: latest
// frequency and damping (with its interval), the band as colour + shape + word, the 24-hour
// damping sparkline with the two threshold lines, and the time since the last estimate.
// Refreshes by itself: a 30 s poll plus live events (new alerts, finished scans).
import { Link, type Href } from 'expo-router';
import { useMemo } from 'react';
import { StyleSheet, View } from 'react-native';
import type { WatchTrack } from '@/shared/api/watch';
import { SPARKLINE_BUCKET_MINUTES, SPARKLINE_HOURS } from '@/shared/api/watch';
import { errorMessage } from '@/hooks/api-client';
import { useLiveEvents } from '@/hooks/use-events';
import { useWatchQuery, WATCH_REFRESH_MS } from '@/hooks/use-watch';
import { AlertCard, Caution } from '../alerts/alert-parts';
import { BandChip } from '../band-chip';
import { Sparkline } from '../charts/sparkline';
import { formatDamping, formatHz, formatPercent } from '../format';
import { CardGrid, Panel, Screen } from '../layout';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Heading, Num, Text } from '../text';
import { bands, colors, fonts, radii, space } from '../theme';
import { formatAge, formatClock, formatDuration, useNow } from './time-format';

const HOUR = 3600_000;

export function WatchScreen() {
  const watch = useWatchQuery();
  const live = useLiveEvents();
  const now = useNow(10_000);
  const fetchedAt = watch.dataUpdatedAt || now;

  return (
    <Screen title="Watch" intro="Every tracked mode now: its latest estimate, its damping band and the last 24 hours." actions={<LiveNote live={live} fetchedAt={watch.dataUpdatedAt} now={now} />}>
      {watch.isPending ? (
        <LoadingState label="Loading the latest estimates…" />
      ) : watch.error && !watch.data ? (
        <ErrorState title="Could not load Watch" message={errorMessage(watch.error)} onRetry={() => void watch.refetch()} />
      ) : watch.data.tracks.length === 0 ? (
        <EmptyState title="No mode tracks yet" message="An administrator or engineer adds mode tracks under Network → Mode tracks." />
      ) : (
        <WatchBoard tracks={watch.data.tracks} caution={watch.data.caution} now={now} fetchedAt={fetchedAt} refreshError={watch.error ? errorMessage(watch.error) : null} />
      )}
    </Screen>
  );
}

function LiveNote({ live, fetchedAt, now }: { live: boolean; fetchedAt: number; now: number }) {
  const age = fetchedAt ? (now - fetchedAt) / 1000 : null;
  return (
    <View style={styles.live} role="status" aria-live="polite">
      <View style={[styles.liveDot, { backgroundColor: live ? colors.accent : colors.ruleStrong }]} />
      <Text variant="small" muted>
        {live ? 'Live' : `Refreshes every ${WATCH_REFRESH_MS / 1000} s`}
        {age != null ? ` · checked ${formatAge(age)}` : ''}
      </Text>
    </View>
  );
}

/** Seconds since the track's latest estimate, counted on from the server's answer. */
function ageOf(t: WatchTrack, now: number, fetchedAt: number): number | null {
  return t.latest ? t.latest.ageSeconds + Math.max(0, (now - fetchedAt) / 1000) : null;
}

function isStale(t: WatchTrack, now: number, fetchedAt: number): boolean {
  const age = ageOf(t, now, fetchedAt);
  return t.stale || age === null || age > t.staleAfterSeconds;
}

function WatchBoard({ tracks, caution, now, fetchedAt, refreshError }: { tracks: WatchTrack[]; caution: string; now: number; fetchedAt: number; refreshError: string | null }) {
  // Open alerts first (escalated before the rest), then acknowledged ones still running.
  const alerts = useMemo(
    () =>
      tracks
        .flatMap((t) => t.openAlerts)
        .sort((a, b) => (a.state === b.state ? b.level - a.level || Date.parse(b.openedAt) - Date.parse(a.openedAt) : a.state === 'open' ? -1 : 1)),
    [tracks],
  );
  const stale = tracks.filter((t) => isStale(t, now, fetchedAt));
  return (
    <View style={styles.board}>
      {refreshError ? (
        <View role="alert" style={styles.refreshError}>
          <Text variant="small" color={colors.danger}>
            Could not refresh: {refreshError} Showing the last answer.
          </Text>
        </View>
      ) : null}
      <View role="region" aria-label="Open alerts" style={styles.section}>
        <Heading level={2}>{alerts.length === 0 ? 'No open alerts' : alerts.length === 1 ? '1 alert running' : `${alerts.length} alerts running`}</Heading>
        {alerts.length === 0 ? (
          <Text variant="small" muted>
            No mode is poorly damped or forced right now.
          </Text>
        ) : (
          <CardGrid>
            {alerts.map((a) => (
              <AlertCard key={a.id} alert={a} now={now} fetchedAt={fetchedAt} />
            ))}
          </CardGrid>
        )}
      </View>

      {stale.length > 0 ? <StaleWarning tracks={stale} now={now} fetchedAt={fetchedAt} /> : null}

      <View role="region" aria-label="Mode tracks" style={styles.section}>
        <Heading level={2}>Modes</Heading>
        <CardGrid>
          {tracks.map((t) => (
            <TrackCard key={t.code} track={t} now={now} fetchedAt={fetchedAt} />
          ))}
        </CardGrid>
      </View>
      <Caution text={caution} />
    </View>
  );
}

function StaleWarning({ tracks, now, fetchedAt }: { tracks: WatchTrack[]; now: number; fetchedAt: number }) {
  return (
    <View role="alert" style={styles.stale} testID="stale-warning">
      <Text bold>
        {tracks.length === 1 ? 'Stale data on 1 mode' : `Stale data on ${tracks.length} modes`}
      </Text>
      {tracks.map((t) => {
        const age = ageOf(t, now, fetchedAt);
        return (
          <Text key={t.code} variant="small">
            <Text variant="small" bold>
              {t.name}
            </Text>
            {age === null
              ? ': no estimate yet.'
              : `: no new estimate for ${formatDuration(age)}; one is expected at least every ${formatDuration(t.staleAfterSeconds)}. Its figures below are from ${formatClock(t.latest!.at)}.`}
          </Text>
        );
      })}
      <Text variant="small" muted>
        Check that PMU data are arriving and that scans are running.
      </Text>
    </View>
  );
}

function TrackCard({ track: t, now, fetchedAt }: { track: WatchTrack; now: number; fetchedAt: number }) {
  const est = t.latest;
  const age = ageOf(t, now, fetchedAt);
  const stale = isStale(t, now, fetchedAt);
  const damping = est ? formatDamping(est.dampingPercent, est.dampingLo, est.dampingHi) : null;
  const to = est ? Date.parse(est.at) : now;
  const from = to - SPARKLINE_HOURS * HOUR;
  const spark = t.sparkline.map((p) => ({ t: Date.parse(p.t), min: p.min, mean: p.mean, max: p.max }));
  const sparkLabel =
    spark.length > 0
      ? `Damping over the 24 hours to the latest estimate: ${spark.length} ten-minute intervals, latest mean ${formatPercent(spark[spark.length - 1].mean)}, lowest ${formatPercent(Math.min(...spark.map((p) => p.min)))}. Lines at ${formatPercent(t.poorBelow)} and ${formatPercent(t.lowBelow)}.`
      : `No damping estimates in the last 24 hours. Lines at ${formatPercent(t.poorBelow)} and ${formatPercent(t.lowBelow)}.`;
  const running = t.openAlerts.length > 0;
  return (
    <Panel style={[styles.card, est ? { borderTopColor: bands[est.band].color } : null]} testID={`watch-track-${t.code}`} label={`Mode ${t.name}`}>
      <View style={styles.cardHead}>
        <View style={styles.cardTitle}>
          <Heading level={3} style={styles.trackName}>
            {t.name}
          </Heading>
          <Text variant="caption" muted numberOfLines={1}>
            {formatHzRangeShort(t.minHz, t.maxHz)}
            {t.corridor ? ` · ${t.corridor.name}` : ''}
          </Text>
        </View>
        {est ? <BandChip band={est.band} detail={damping ?? undefined} testID={`band-${t.code}-${est.band}`} /> : <NoEstimateTag />}
      </View>

      {est ? (
        <View style={styles.figures}>
          <Figure label="Damping ratio" value={damping!} strong />
          <Figure label="Frequency" value={formatHz(est.frequencyHz)} />
        </View>
      ) : (
        <Text variant="small" muted style={styles.noEst}>
          No estimate yet. Estimates appear once a scan has run on a recording that covers this mode.
        </Text>
      )}

      <View style={styles.spark}>
        <Text variant="caption" muted>
          Damping, 24 h to {formatClock(new Date(to).toISOString())}
        </Text>
        <Sparkline points={spark} poorBelow={t.poorBelow} lowBelow={t.lowBelow} from={from} to={to} bucketMs={SPARKLINE_BUCKET_MINUTES * 60_000} label={sparkLabel} testID={`spark-${t.code}`} />
      </View>

      <View style={styles.foot}>
        <Text variant="small" color={stale ? colors.danger : colors.inkMuted} testID={`age-${t.code}`}>
          {est ? (
            <>
              {stale ? 'Stale · ' : ''}Last estimate {formatAge(age ?? 0)} · {formatClock(est.at)}
              {est.forced ? ' · forced oscillation, not counted as poor damping' : ''}
            </>
          ) : (
            'Waiting for the first estimate'
          )}
        </Text>
        <View style={styles.links}>
          {running ? (
            <Link href={`/alerts/${t.openAlerts[0].id}` as Href} style={styles.link} aria-label={`Open the alert on ${t.name}`}>
              Alert
            </Link>
          ) : null}
          <Link href={`/trends?track=${t.code}` as Href} style={styles.link} aria-label={`Trends of ${t.name}`}>
            Trends
          </Link>
        </View>
      </View>
    </Panel>
  );
}

function formatHzRangeShort(a: number, b: number): string {
  return `${a.toFixed(2)}–${b.toFixed(2)} Hz`;
}

function NoEstimateTag() {
  return (
    <View style={styles.noTag}>
      <Text variant="caption" bold muted>
        no estimate
      </Text>
    </View>
  );
}

function Figure({ label, value, strong }: { label: string; value: string; strong?: boolean }) {
  return (
    <View>
      <Text variant="caption" muted>
        {label}
      </Text>
      <Num variant={strong ? 'title' : 'heading'} bold={strong}>
        {value}
      </Num>
    </View>
  );
}

const styles = StyleSheet.create({
  board: { gap: space.xl },
  section: { gap: space.md },
  live: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  liveDot: { width: 8, height: 8, borderRadius: 4 },
  refreshError: { backgroundColor: colors.dangerSoft, borderRadius: radii.sm, padding: space.sm },
  stale: {
    borderWidth: 1,
    borderColor: colors.danger,
    borderLeftWidth: 4,
    backgroundColor: colors.dangerSoft,
    borderRadius: radii.md,
    padding: space.md,
    gap: space.xs,
  },
  card: { flex: 1, borderTopWidth: 4, gap: space.md },
  cardHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: space.sm },
  cardTitle: { flexShrink: 1, gap: 2 },
  trackName: { fontSize: 18, lineHeight: 24 },
  figures: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.xl, rowGap: space.sm },
  noEst: {},
  spark: { gap: space.xxs },
  foot: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', justifyContent: 'space-between', gap: space.sm, borderTopWidth: 1, borderTopColor: colors.rule, paddingTop: space.sm },
  links: { flexDirection: 'row', gap: space.lg },
  link: { color: colors.accent, fontFamily: fonts.textBold, textDecorationLine: 'underline', fontSize: 14, lineHeight: 20, paddingVertical: 4 },
  noTag: { borderWidth: 1, borderStyle: 'dashed', borderColor: colors.ruleStrong, borderRadius: radii.pill, paddingHorizontal: space.sm, paddingVertical: 1 },
});
