// Pieces shared by Watch and the Alerts screens: the alert's state tag, its kind in words, the
// compact alert card (a link to the alert's page) and the advisory caution (DESIGN.md §1).
import { Link, type Href } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { AlertSummary } from '@/shared/api/alerts';
import { BandChip } from '../band-chip';
import { formatPercent } from '../format';
import { Num, Text } from '../text';
import { colors, radii, space } from '../theme';
import { formatClock, formatDuration } from '../watch/time-format';

export const STATE_WORDS: Record<AlertSummary['state'], string> = {
  open: 'Open',
  acknowledged: 'Acknowledged',
  cleared: 'Cleared',
};

export function kindWords(a: Pick<AlertSummary, 'kind' | 'level'>): string {
  const base = a.kind === 'poor' ? 'Poorly damped mode' : 'Forced oscillation';
  return a.level >= 2 ? `${base}, escalated` : base;
}

/** Open: solid ink (needs a look); acknowledged: outlined; cleared: quiet. Words always shown. */
export function StateTag({ state }: { state: AlertSummary['state'] }) {
  const s = state === 'open' ? styles.tagOpen : state === 'acknowledged' ? styles.tagAck : styles.tagCleared;
  const fg = state === 'open' ? colors.surface : state === 'acknowledged' ? colors.ink : colors.inkMuted;
  return (
    <View style={[styles.tag, s]} testID={`alert-state-${state}`}>
      <Text variant="caption" bold color={fg}>
        {STATE_WORDS[state]}
      </Text>
    </View>
  );
}

/** How long it has lasted (counting on while it is not cleared). */
export function alertDuration(a: AlertSummary, now: number, fetchedAt: number): number {
  return a.clearedAt ? a.durationSeconds : a.durationSeconds + Math.max(0, (now - fetchedAt) / 1000);
}

/** A compact alert card that opens the alert's page. */
export function AlertCard({ alert, now, fetchedAt, showTrack = true }: { alert: AlertSummary; now: number; fetchedAt: number; showTrack?: boolean }) {
  const band = alert.kind === 'forced' ? 'forced' : 'poor';
  const lasted = formatDuration(alertDuration(alert, now, fetchedAt), { coarse: true });
  const worst = alert.worstDamping != null ? formatPercent(alert.worstDamping) : null;
  const title = showTrack ? alert.trackName : kindWords(alert);
  return (
    <Link href={`/alerts/${alert.id}` as Href} asChild>
      <Pressable
        role="link"
        aria-label={`${alert.trackName}: ${kindWords(alert)}, ${STATE_WORDS[alert.state].toLowerCase()}, lasted ${lasted}${worst ? `, lowest damping ${worst}` : ''}. Open the alert.`}
        // One flat style object: Link's asChild merges styles by object spread, which drops arrays
        // and press-state functions.
        style={StyleSheet.flatten([styles.card, alert.state === 'open' && styles.cardOpen])}
        testID={`alert-card-${alert.id}`}
      >
        <View style={styles.cardHead}>
          <BandChip band={band} size="small" />
          <Text bold style={styles.cardTitle} numberOfLines={1}>
            {title}
          </Text>
          <StateTag state={alert.state} />
        </View>
        <Text variant="small" muted>
          {showTrack ? `${kindWords(alert)} · ` : ''}since {formatClock(alert.openedAt)} · lasted {lasted}
          {alert.clearedAt ? ` · cleared ${formatClock(alert.clearedAt)}` : ''}
        </Text>
        {worst ? (
          <Text variant="small">
            Lowest damping <Num variant="small" bold>{worst}</Num>
            <Text variant="small" muted>{`  (poor under ${formatPercent(alert.poorBelow)})`}</Text>
          </Text>
        ) : null}
        {alert.acknowledgedBy ? (
          <Text variant="caption" muted numberOfLines={2}>
            Acknowledged by {alert.acknowledgedBy.displayName}
            {alert.acknowledgedAt ? ` at ${formatClock(alert.acknowledgedAt)}` : ''}
            {alert.note ? `: “${alert.note}”` : ''}
          </Text>
        ) : null}
      </Pressable>
    </Link>
  );
}

/** The advisory caution shown on the alert screens and the transfer study (text from the server). */
export function Caution({ text, testID }: { text: string; testID?: string }) {
  return (
    <View style={styles.caution} role="note" aria-label="Caution" testID={testID ?? 'caution'}>
      <Text variant="small" bold style={styles.cautionHead}>
        Caution
      </Text>
      <Text variant="small">{text}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  tag: { borderRadius: radii.sm, paddingHorizontal: space.sm, paddingVertical: 1, borderWidth: 1, alignSelf: 'center' },
  tagOpen: { backgroundColor: colors.ink, borderColor: colors.ink },
  tagAck: { backgroundColor: colors.surface, borderColor: colors.ink },
  tagCleared: { backgroundColor: colors.paper, borderColor: colors.rule },
  card: {
    borderWidth: 1,
    borderColor: colors.rule,
    borderRadius: radii.md,
    backgroundColor: colors.surface,
    padding: space.md,
    gap: space.xs,
  },
  cardOpen: { borderLeftWidth: 4, borderLeftColor: colors.ink },
  cardHead: { flexDirection: 'row', alignItems: 'center', gap: space.sm },
  cardTitle: { flex: 1, minWidth: 0 },
  caution: {
    borderLeftWidth: 3,
    borderLeftColor: colors.ruleStrong,
    backgroundColor: colors.surface,
    borderRadius: radii.sm,
    paddingVertical: space.sm,
    paddingHorizontal: space.md,
    gap: 2,
  },
  cautionHead: { letterSpacing: 0.3 },
});
