// One alert: what and where, how long it has lasted, the damping (and frequency) trace around it
// with the alert's span shaded and the worst window marked, the mode shape at that window (polar
// plot and table), who was told, its history, and acknowledge-with-note for the roles allowed
// (admin, engineer, operator — the server enforces the same). The advisory caution is always shown.
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { acknowledgeBodySchema, type AlertDetailResponse } from '@/shared/api/alerts';
import { ApiError, errorMessage } from '@/hooks/api-client';
import { useAcknowledgeAlertMutation, useAlertQuery } from '@/hooks/use-alerts';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useLiveEvents } from '@/hooks/use-events';
import { BandChip } from '../band-chip';
import { Button } from '../button';
import { DampingChart, medianSpacing } from '../charts/damping-chart';
import { LineChart } from '../charts/line-chart';
import { describeShape, groupColorMap, PolarChart } from '../charts/polar-chart';
import { useChartZoom } from '../charts/zoom';
import { formatDateTime, formatHz, formatPercent } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { EmptyState, ErrorState, LoadingState, Notice } from '../state-views';
import { Heading, Num, Text } from '../text';
import { TextField } from '../text-field';
import { TextLink } from '../text-link';
import { bands, colors, space } from '../theme';
import { formatClock, formatDuration, useNow } from '../watch/time-format';
import { alertDuration, Caution, kindWords, StateTag } from './alert-parts';
import { ShapeTable } from './shape-table';

export function areaName(code: string): string {
  return code
    .split('-')
    .map((w) => (w ? w[0].toUpperCase() + w.slice(1) : w))
    .join(' ');
}

export function AlertScreen({ id: idParam }: { id?: string }) {
  const id = idParam != null && /^\d+$/.test(idParam) ? Number(idParam) : undefined;
  useLiveEvents();
  const q = useAlertQuery(id);
  if (id === undefined) {
    return (
      <Screen title="Alert">
        <ErrorState title="No such alert" message={`“${idParam ?? ''}” is not an alert number.`} />
      </Screen>
    );
  }
  if (q.isPending) {
    return (
      <Screen title={`Alert ${id}`}>
        <LoadingState label="Loading the alert…" />
      </Screen>
    );
  }
  if (q.error && !q.data) {
    const missing = q.error instanceof ApiError && q.error.status === 404;
    return (
      <Screen title={`Alert ${id}`}>
        <ErrorState title={missing ? 'No such alert' : 'Could not load the alert'} message={errorMessage(q.error)} onRetry={missing ? undefined : () => void q.refetch()} />
        <View style={styles.back}>
          <TextLink href="/alerts">All alerts</TextLink>
        </View>
      </Screen>
    );
  }
  return <AlertView d={q.data} fetchedAt={q.dataUpdatedAt} />;
}

function AlertView({ d, fetchedAt }: { d: AlertDetailResponse; fetchedAt: number }) {
  const a = d.alert;
  const bp = useBreakpoint();
  const now = useNow(10_000);
  const band = a.kind === 'forced' ? 'forced' : 'poor';
  const lasted = formatDuration(alertDuration(a, now, fetchedAt), { coarse: true });

  const summary = (
    <Panel label="Summary" testID="alert-summary">
      <View style={styles.chips}>
        <BandChip band={band} detail={a.worstDamping != null ? `lowest ${formatPercent(a.worstDamping)}` : undefined} />
        <StateTag state={a.state} />
        {a.level >= 2 ? (
          <Text variant="small" bold color={bands.poor.color}>
            Escalated
          </Text>
        ) : null}
      </View>
      <View style={styles.facts}>
        <Fact label="Lasted" value={a.clearedAt ? lasted : `${lasted}, still running`} testID="alert-lasted" words />
        <Fact label="Opened" value={formatDateTime(a.openedAt)} />
        {a.escalatedAt ? <Fact label="Escalated" value={formatDateTime(a.escalatedAt)} /> : null}
        <Fact label="Cleared" value={a.clearedAt ? formatDateTime(a.clearedAt) : 'not yet'} words={!a.clearedAt} />
        {a.worstDamping != null ? <Fact label="Lowest damping" value={`${formatPercent(a.worstDamping)}${d.worstAt ? ` at ${formatClock(d.worstAt)}` : ''}`} /> : null}
        <Fact label="Thresholds" value={`poor under ${formatPercent(a.poorBelow)}, low under ${formatPercent(a.lowBelow)}`} words />
      </View>
    </Panel>
  );

  const ack = <AcknowledgePanel d={d} />;
  const charts = <TracePanel d={d} now={now} />;
  const shape = <ShapePanel d={d} />;
  const notified = <NotifiedPanel d={d} />;
  const history = <HistoryPanel d={d} />;
  const caution = <Caution text={d.caution} />;

  return (
    <Screen title={`${a.trackName}: ${kindWords(a).toLowerCase()}`} intro={`Alert ${a.id} on the ${a.trackName} mode track.`}>
      <View style={styles.stack}>
        {caution}
        {bp.isWide ? (
          <Columns max={2} weights={[3, 2]}>
            <View style={styles.stack}>
              {charts}
              {shape}
            </View>
            <View style={styles.stack}>
              {summary}
              {ack}
              {notified}
              {history}
            </View>
          </Columns>
        ) : (
          <>
            {summary}
            {ack}
            {charts}
            {shape}
            {notified}
            {history}
          </>
        )}
        <TextLink href="/alerts">All alerts</TextLink>
      </View>
    </Screen>
  );
}

function Fact({ label, value, testID, words }: { label: string; value: string; testID?: string; words?: boolean }) {
  const V = words ? Text : Num;
  return (
    <View style={styles.fact}>
      <Text variant="small" muted style={styles.factLabel}>
        {label}
      </Text>
      <V variant="small" style={styles.factValue} testID={testID}>
        {value}
      </V>
    </View>
  );
}

function AcknowledgePanel({ d }: { d: AlertDetailResponse }) {
  const a = d.alert;
  const can = useCan();
  const ack = useAcknowledgeAlertMutation();
  const [note, setNote] = useState('');
  const [done, setDone] = useState(false);
  const [localError, setLocalError] = useState<string | undefined>();
  const fieldError = localError ?? (ack.error instanceof ApiError ? ack.error.fieldErrors().note : undefined);
  const formError = ack.error && !fieldError ? errorMessage(ack.error) : undefined;

  const acknowledged = a.acknowledgedBy ? (
    <View style={styles.ackDone} testID="acknowledged-by">
      <Text variant="small">
        Acknowledged by <Text variant="small" bold>{a.acknowledgedBy.displayName}</Text>
        {a.acknowledgedAt ? ` at ${formatDateTime(a.acknowledgedAt)}` : ''}
      </Text>
      {a.note ? <Text style={styles.note}>“{a.note}”</Text> : null}
    </View>
  ) : null;

  if (a.state !== 'open') {
    return (
      <Panel title="Acknowledgement">
        {acknowledged ?? (
          <Text variant="small" muted>
            Cleared by the rule before anyone acknowledged it.
          </Text>
        )}
        {done ? <Notice kind="ok">Acknowledged. The alert stays listed until the rule clears it.</Notice> : null}
      </Panel>
    );
  }
  if (!can('acknowledgeAlert')) {
    return (
      <Panel title="Acknowledgement">
        {acknowledged}
        <Text variant="small" muted>
          Not acknowledged yet. Operators, engineers and administrators acknowledge alerts; your role can view them.
        </Text>
      </Panel>
    );
  }
  const submit = () => {
    // The API's own schema checks the note first, so an empty note gets the same words without a round trip.
    const parsed = acknowledgeBodySchema.safeParse({ note });
    if (!parsed.success) {
      setLocalError(parsed.error.issues[0]?.message ?? 'A note is required');
      return;
    }
    setLocalError(undefined);
    ack.mutate(
      { id: a.id, note },
      {
        onSuccess: () => {
          setDone(true);
          setNote('');
        },
      },
    );
  };
  return (
    <Panel title={a.level >= 2 && a.acknowledgedBy ? 'Acknowledge the escalation' : 'Acknowledge'}>
      {acknowledged}
      {formError ? <Notice kind="error">{formError}</Notice> : null}
      <TextField
        label="Note"
        hint="Say what you saw or did. Kept with the alert and in the audit log."
        value={note}
        onChangeText={(t) => {
          setNote(t);
          if (localError) setLocalError(undefined);
        }}
        multiline
        required
        error={fieldError}
        maxLength={2000}
      />
      <Button title="Acknowledge" onPress={submit} busy={ack.isPending} label={`Acknowledge alert ${a.id} on ${a.trackName}`} />
    </Panel>
  );
}

function TracePanel({ d, now }: { d: AlertDetailResponse; now: number }) {
  const a = d.alert;
  const bp = useBreakpoint();
  const from = Date.parse(d.traceFrom);
  const to = Date.parse(d.traceTo);
  const full = useMemo(() => [from, to] as const, [from, to]);
  const zoom = useChartZoom({ full });
  const points = d.trace.map((p) => ({ x: Date.parse(p.at), y: p.dampingPercent, lo: p.dampingLo, hi: p.dampingHi, forced: p.forced }));
  const spanColor = a.kind === 'forced' ? bands.forced.color : bands.poor.color;
  const spans = [{ from: Date.parse(a.openedAt), to: a.clearedAt ? Date.parse(a.clearedAt) : Math.max(to, now), color: spanColor, label: 'alert', opacity: 0.12 }];
  const markers = d.worstAt ? [{ x: Date.parse(d.worstAt), label: 'lowest', color: colors.ink }] : [];
  const freq = d.trace.filter((p) => !p.forced).map((p) => ({ x: Date.parse(p.at), y: p.frequencyHz }));
  const lastF = freq[freq.length - 1];
  return (
    <Panel title="Damping around the alert">
      {points.length === 0 ? (
        <EmptyState title="No estimates around this alert" />
      ) : (
        <View style={styles.stack}>
          <DampingChart poorBelow={a.poorBelow} lowBelow={a.lowBelow} points={points} spans={spans} markers={markers} xExtent={full} zoom={zoom} height={bp.isWide ? 280 : 240} testID="alert-damping-chart" />
          {freq.length > 1 ? (
            <LineChart
              label={`Frequency of the mode around the alert: ${freq.length} estimates, latest ${formatHz(lastF.y)}.`}
              height={150}
              x={{ kind: 'time' }}
              y={{ title: 'Frequency, Hz' }}
              series={[{ kind: 'line', id: 'f', label: 'Frequency', color: colors.ink, width: 1.5, points: freq, maxGap: medianSpacing(freq.map((p) => p.x)) * 4 }]}
              spans={spans.map((s) => ({ ...s, label: undefined }))}
              xExtent={full}
              zoom={zoom}
              controls={false}
              legend={false}
            />
          ) : null}
          <Text variant="caption" muted>
            From an hour before the alert opened to an hour after it cleared (or now). Shaded: while the alert ran.
          </Text>
        </View>
      )}
    </Panel>
  );
}

function ShapePanel({ d }: { d: AlertDetailResponse }) {
  const entries = d.worstShape;
  const colorsBy = useMemo(() => groupColorMap(entries.map((e) => areaName(e.area))), [entries]);
  if (d.alert.kind === 'forced') return null;
  return (
    <Panel title="Mode shape at the lowest damping">
      {entries.length === 0 ? (
        <EmptyState title="No mode shape stored" message="The window with the lowest damping kept no mode shape." />
      ) : (
        <View style={styles.stack}>
          <Text variant="small" muted>
            {d.worstAt ? `Window ending ${formatDateTime(d.worstAt)}. ` : ''}Arrow length: swing relative to the largest (1.00); direction: phase angle. Sites pointing opposite ways swing against each other.
          </Text>
          <PolarChart
            entries={entries.map((e) => ({ id: e.channel, label: e.siteName, magnitude: e.magnitude, angleDeg: e.angleDeg, group: areaName(e.area) }))}
            groupColors={colorsBy}
            label={describeShape(entries.map((e) => ({ label: e.siteName, magnitude: e.magnitude, angleDeg: e.angleDeg })))}
            testID="alert-shape"
          />
          <ShapeTable entries={entries.map((e) => ({ ...e, area: areaName(e.area) }))} colorsBy={colorsBy} />
        </View>
      )}
    </Panel>
  );
}

const EVENT_WORDS = { opened: 'opened', escalated: 'escalated', cleared: 'cleared' } as const;

function NotifiedPanel({ d }: { d: AlertDetailResponse }) {
  return (
    <Panel title="Who was told">
      {d.notifications.length === 0 ? (
        <Text variant="small" muted>
          Nobody follows this mode track, so no e-mail went out.
        </Text>
      ) : (
        <View role="list" aria-label="Notifications" style={styles.list}>
          {d.notifications.map((n, i) => (
            <View role="listitem" key={`${n.personId}-${n.event}-${i}`} style={styles.listRow}>
              <Text variant="small" bold>
                {n.displayName}
              </Text>
              <Text variant="small" muted>
                {n.email} · e-mail on {EVENT_WORDS[n.event]} · {n.sentAt ? `sent ${formatClock(n.sentAt)}` : 'queued'}
              </Text>
            </View>
          ))}
        </View>
      )}
    </Panel>
  );
}

const ACTION_WORDS: Record<string, string> = {
  'alert.opened': 'Opened by the rule',
  'alert.escalated': 'Escalated by the rule',
  'alert.cleared': 'Cleared by the rule',
  'alert.acknowledged': 'Acknowledged',
};

function HistoryPanel({ d }: { d: AlertDetailResponse }) {
  if (d.history.length === 0) return null;
  return (
    <Panel title="History">
      <View role="list" aria-label="History" style={styles.list}>
        {d.history.map((h, i) => {
          const note = typeof h.details.note === 'string' ? h.details.note : null;
          return (
            <View role="listitem" key={i} style={styles.listRow}>
              <Text variant="small">
                <Num variant="small">{formatDateTime(h.at)}</Num> · {ACTION_WORDS[h.action] ?? h.action}
                {h.displayName ? ` by ${h.displayName}` : ''}
              </Text>
              {note ? (
                <Text variant="small" muted>
                  “{note}”
                </Text>
              ) : null}
            </View>
          );
        })}
      </View>
    </Panel>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  back: { marginTop: space.lg },
  chips: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.sm, marginBottom: space.md },
  facts: { gap: space.xs },
  fact: { flexDirection: 'row', gap: space.md, alignItems: 'baseline' },
  factLabel: { width: 112 },
  factValue: { flex: 1 },
  ackDone: { gap: space.xs, marginBottom: space.md },
  note: { fontStyle: 'italic' },
  list: { gap: space.sm },
  listRow: { gap: 2, borderBottomWidth: 1, borderBottomColor: colors.rule, paddingBottom: space.sm },
});
