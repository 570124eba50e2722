import { StyleSheet, View } from 'react-native';
import type { Corridor, Track } from '@/shared/api/network';
import { BANDS, type Band } from '@/shared/bands';
import { errorMessage } from '@/hooks/api-client';
import { useCorridorsQuery } from '@/hooks/use-corridors';
import { useTracksQuery } from '@/hooks/use-tracks';
import { BandChip } from '../band-chip';
import { formatDamping, formatDateTime, formatHz, formatHzRange, formatPercent } from '../format';
import { CardGrid, Panel, Screen } from '../layout';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Heading, Num, Text } from '../text';
import { bands, colors, radii, space } from '../theme';
import { ThresholdScale } from '../threshold-scale';

/** Watch: every tracked mode, its band thresholds and frequency range, and its latest estimate. */
export function WatchScreen() {
  // Live view: refresh the latest estimates every 30 s without any action.
  const tracks = useTracksQuery({ refetchInterval: 30_000 });
  const corridors = useCorridorsQuery();
  const corridorName = (id: number | null) => (id == null ? null : corridors.data?.corridors.find((c: Corridor) => c.id === id)?.name ?? null);

  return (
    <Screen title="Watch" intro="Every tracked oscillation mode, its damping bands and its latest estimate.">
      {tracks.isPending ? (
        <LoadingState label="Loading mode tracks…" />
      ) : tracks.error ? (
        <ErrorState title="Could not load the mode tracks" message={errorMessage(tracks.error)} onRetry={() => void tracks.refetch()} />
      ) : tracks.data.tracks.length === 0 ? (
        <EmptyState
          title="No mode tracks yet"
          message="An administrator or engineer adds mode tracks under Network → Mode tracks."
        />
      ) : (
        <>
          <Summary tracks={tracks.data.tracks} />
          <CardGrid>
            {tracks.data.tracks.map((t: Track) => (
              <TrackCard key={t.id} track={t} corridor={corridorName(t.corridorId)} />
            ))}
          </CardGrid>
        </>
      )}
    </Screen>
  );
}

function Summary({ tracks }: { tracks: Track[] }) {
  const counts: Record<Band, number> = { poor: 0, low: 0, ample: 0, forced: 0 };
  let none = 0;
  for (const t of tracks) {
    if (t.latestEstimate) counts[t.latestEstimate.band] += 1;
    else none += 1;
  }
  return (
    <View style={styles.summary} role="region" aria-label="Summary">
      <Text bold>
        {tracks.length} {tracks.length === 1 ? 'mode track' : 'mode tracks'}
      </Text>
      {BANDS.map((b) => (
        <Text key={b} variant="small" color={colors.inkMuted}>
          <Text aria-hidden variant="small" color={bands[b].color}>
            {bands[b].shape}
          </Text>{' '}
          {counts[b]} {bands[b].word}
        </Text>
      ))}
      {none > 0 ? (
        <Text variant="small" muted>
          {none} without an estimate
        </Text>
      ) : null}
    </View>
  );
}

function TrackCard({ track, corridor }: { track: Track; corridor: string | null }) {
  const est = track.latestEstimate;
  return (
    <Panel style={styles.card} testID={`track-${track.code}`} label={`Mode track ${track.name}`}>
      <View style={styles.cardHead}>
        <View style={styles.cardTitle}>
          <Heading level={2}>{track.name}</Heading>
          <Text variant="small" muted mono>
            {track.code}
            {corridor ? <Text variant="small" muted>{`  ·  ${corridor}`}</Text> : null}
          </Text>
        </View>
        {est ? <BandChip band={est.band} detail={formatDamping(est.dampingPercent, est.dampingLo, est.dampingHi)} /> : null}
      </View>

      {track.description ? (
        <Text variant="small" muted style={styles.desc}>
          {track.description}
        </Text>
      ) : null}

      <View style={styles.latest}>
        {est ? (
          <>
            <View style={styles.figures}>
              <Figure label="Frequency" value={formatHz(est.frequencyHz)} />
              <Figure label="Damping ratio" value={formatDamping(est.dampingPercent, est.dampingLo, est.dampingHi)} />
            </View>
            <Text variant="caption" muted style={styles.estMeta}>
              {est.method} · {formatDateTime(est.at)}
              {est.forced ? ' · forced oscillation, not counted as poor damping' : ''}
            </Text>
          </>
        ) : (
          <Text variant="small" muted>
            No estimate yet. Estimates appear here once a scan or a fit has run on a recording.
          </Text>
        )}
      </View>

      <View style={styles.facts}>
        <Fact label="Frequency range" value={formatHzRange(track.minHz, track.maxHz)} />
        <View style={styles.fact}>
          <Text variant="small" muted style={styles.factLabel}>
            Bands
          </Text>
          <View style={styles.bandsList}>
            <Text variant="small" mono>
              <Text aria-hidden variant="small" color={bands.poor.color}>{bands.poor.shape}</Text> poor {'<'} {formatPercent(track.poorBelow)}
            </Text>
            <Text variant="small" mono>
              <Text aria-hidden variant="small" color={bands.low.color}>{bands.low.shape}</Text> low {formatPercent(track.poorBelow)}–{formatPercent(track.lowBelow)}
            </Text>
            <Text variant="small" mono>
              <Text aria-hidden variant="small" color={bands.ample.color}>{bands.ample.shape}</Text> ample ≥ {formatPercent(track.lowBelow)}
            </Text>
          </View>
        </View>
        <ThresholdScale poorBelow={track.poorBelow} lowBelow={track.lowBelow} value={est && !est.forced ? est.dampingPercent : null} />
      </View>
    </Panel>
  );
}

function Figure({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.figure}>
      <Text variant="caption" muted>
        {label}
      </Text>
      <Num variant="heading" bold>
        {value}
      </Num>
    </View>
  );
}

function Fact({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.fact}>
      <Text variant="small" muted style={styles.factLabel}>
        {label}
      </Text>
      <Num variant="small">{value}</Num>
    </View>
  );
}

const styles = StyleSheet.create({
  summary: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'baseline',
    columnGap: space.lg,
    rowGap: space.xs,
    marginBottom: space.lg,
    paddingVertical: space.sm,
    paddingHorizontal: space.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.rule,
    backgroundColor: colors.surface,
  },
  card: { flex: 1 },
  cardHead: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'flex-start', gap: space.sm },
  cardTitle: { flexShrink: 1 },
  desc: { marginTop: space.sm },
  latest: {
    marginTop: space.md,
    paddingVertical: space.md,
    borderTopWidth: 1,
    borderBottomWidth: 1,
    borderColor: colors.rule,
  },
  figures: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.xl, rowGap: space.sm },
  figure: {},
  estMeta: { marginTop: space.sm },
  facts: { marginTop: space.md, gap: space.sm },
  fact: { flexDirection: 'row', alignItems: 'flex-start', gap: space.md },
  factLabel: { width: 118 },
  bandsList: { gap: 2 },
});
