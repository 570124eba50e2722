// Alerts: the alerts by state — open (need a look), acknowledged (someone is on it, still
// running), cleared (over) — newest first, each a card that opens the alert's page. On wide
// screens the rule and the caution sit beside the list.
import { router } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { ALERT_STATES, type AlertSummary } from '@/shared/api/alerts';
import { errorMessage } from '@/hooks/api-client';
import { useAlertsQuery } from '@/hooks/use-alerts';
import { useLiveEvents } from '@/hooks/use-events';
import { useTracksQuery } from '@/hooks/use-tracks';
import { formatPercent } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { SelectField } from '../select-field';
import { EmptyState, ErrorState, LoadingState } from '../state-views';
import { Text } from '../text';
import { bands, space } from '../theme';
import { useNow } from '../watch/time-format';
import { AlertCard, Caution } from './alert-parts';
import { Tabs } from './state-tabs';

type State = (typeof ALERT_STATES)[number];

/** The select's value for "every track" (an empty value would read as nothing chosen). */
const ALL = '*';

const EMPTY: Record<State, { title: string; message: string }> = {
  open: { title: 'No open alerts', message: 'No mode is poorly damped or forced right now, or every running alert has been acknowledged.' },
  acknowledged: { title: 'No acknowledged alerts running', message: 'Acknowledged alerts stay here until the rule clears them.' },
  cleared: { title: 'No cleared alerts', message: 'Alerts that have ended are kept here.' },
};

export function AlertsScreen({ state: stateParam, track: trackParam }: { state?: string; track?: string }) {
  const state: State = (ALERT_STATES as readonly string[]).includes(stateParam ?? '') ? (stateParam as State) : 'open';
  const track = trackParam || undefined;
  useLiveEvents();
  const now = useNow(15_000);
  const list = useAlertsQuery({ state, track, limit: 200 });
  // Counts for the tabs: one light request per state.
  const open = useAlertsQuery({ state: 'open', track, limit: 500 });
  const acked = useAlertsQuery({ state: 'acknowledged', track, limit: 500 });
  const tracks = useTracksQuery();
  const fetchedAt = list.dataUpdatedAt || now;
  const setParams = (p: { state?: State; track?: string }) => router.setParams({ state: p.state ?? state, track: p.track ?? track ?? '' });
  const countOf = (q: typeof open) => (q.data && !q.isPlaceholderData ? q.data.alerts.length : null);

  const listView = (
    <View style={styles.stack}>
      <Tabs
        label="Alerts by state"
        value={state}
        onChange={(k) => setParams({ state: k })}
        items={[
          { key: 'open', title: 'Open', count: countOf(open) },
          { key: 'acknowledged', title: 'Acknowledged', count: countOf(acked) },
          { key: 'cleared', title: 'Cleared' },
        ]}
      />
      {list.isPending ? (
        <LoadingState label="Loading alerts…" />
      ) : list.error && !list.data ? (
        <ErrorState title="Could not load the alerts" message={errorMessage(list.error)} onRetry={() => void list.refetch()} />
      ) : list.data.alerts.length === 0 ? (
        <EmptyState title={EMPTY[state].title} message={EMPTY[state].message} />
      ) : (
        <View role="list" aria-label={`${state} alerts`} style={styles.list}>
          {list.data.alerts.map((a: AlertSummary) => (
            <View role="listitem" key={a.id}>
              <AlertCard alert={a} now={now} fetchedAt={fetchedAt} />
            </View>
          ))}
        </View>
      )}
    </View>
  );

  const side = (
    <View style={styles.stack}>
      <Panel title="Filter">
        <SelectField
          label="Mode track"
          value={track ?? ALL}
          onChange={(v) => setParams({ track: v === ALL ? '' : v })}
          options={[{ value: ALL, label: 'All tracks' }, ...(tracks.data?.tracks ?? []).map((t) => ({ value: t.code, label: t.name }))]}
        />
      </Panel>
      <Panel title="How alerts work">
        <View style={styles.rule}>
          <Text variant="small">
            <Text variant="small" bold color={bands.poor.color}>
              {bands.poor.shape} Poorly damped:
            </Text>{' '}
            opens when the upper end of the damping interval stays under the track's poor threshold ({formatPercent(3)} by default) for 3 scan windows in a row. Escalates after 10 more, or when a window falls under half the threshold.
          </Text>
          <Text variant="small">
            <Text variant="small" bold color={bands.forced.color}>
              {bands.forced.shape} Forced oscillation:
            </Text>{' '}
            a sustained forced oscillation in the track's band for 3 windows. Never counted as poor damping.
          </Text>
          <Text variant="small">Clears after 3 windows at or above the low threshold ({formatPercent(5)} by default). An escalation reopens an acknowledged alert.</Text>
        </View>
      </Panel>
      {list.data ? <Caution text={list.data.caution} /> : null}
    </View>
  );

  return (
    <Screen title="Alerts" intro="Poorly damped modes and forced oscillations the rule has flagged, by state.">
      <Columns max={2} weights={[2, 1]}>
        {listView}
        {side}
      </Columns>
    </Screen>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  rule: { gap: space.sm },
  list: { gap: space.sm },
});
