// Transfer study: a track's damping against its corridor's transfer over a period — the windows
// as a scatter, the least-squares line with its confidence band, and the transfer at which the
// line reaches the low and poor thresholds (5 % and 3 % by default) with its interval, written
// out and drawn. Beside it the corridor angle against transfer with the 45° practical limit
// (common practice). Save (admin, engineer, planner), export the windows as CSV, reopen saved
// studies. A study is advisory and reviewed by a qualified engineer before it changes a limit.
//
// The fit uses every window of the period; the scatter draws the answer's points, which over a
// long period are a bounded sample (rule in shared/api/studies.ts) — the screen says so under the
// chart. The CSV export is the server's, with every window (GET /api/studies/transfer.csv).
import { router } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { SavedStudySummary, TransferStudy } from '@/shared/api/studies';
import { ApiError, errorMessage } from '@/hooks/api-client';
import { useCan } from '@/hooks/use-auth';
import { useBreakpoint } from '@/hooks/use-breakpoint';
import { useSavedStudiesQuery, useSavedStudyQuery, useSaveStudyMutation, useTransferStudyQuery } from '@/hooks/use-studies';
import { useTracksQuery } from '@/hooks/use-tracks';
import { Caution } from '../alerts/alert-parts';
import { Button } from '../button';
import { bandMarker } from '../charts/markers';
import { ScatterChart, type Projection } from '../charts/scatter-chart';
import { formatDateTime, formatPercent } from '../format';
import { Columns, Panel, Screen } from '../layout';
import { SelectField } from '../select-field';
import { EmptyState, ErrorState, LoadingState, Notice } from '../state-views';
import { Heading, Num, Text } from '../text';
import { TextField } from '../text-field';
import { bands, colors, radii, space } from '../theme';
import { DownloadLink } from '../trends/download-link';
import { DAY_MS, PeriodPicker, type PeriodChoice } from '../trends/period-picker';
import { formatMw, formatMwRange } from './format-mw';
import { studyCsvName, studyCsvUrl } from './study-csv';

export const STUDY_PERIODS: PeriodChoice[] = [
  { key: '1d', title: '24 h', label: 'Last 24 hours', ms: DAY_MS },
  { key: '7d', title: '7 d', label: 'Last 7 days', ms: 7 * DAY_MS },
  { key: '30d', title: '30 d', label: 'Last 30 days', ms: 30 * DAY_MS },
  { key: '90d', title: '90 d', label: 'Last 90 days', ms: 90 * DAY_MS },
];

const ANGLE_COLOR = '#5E6F85';

/** Hour-rounded period ending now, so the query key is stable between renders. */
function periodEndingNow(ms: number): { from: string; to: string } {
  const to = Math.ceil(Date.now() / 3600_000) * 3600_000;
  return { from: new Date(to - ms).toISOString(), to: new Date(to).toISOString() };
}

const DATE_RE = /^\d{4}-\d{2}-\d{2}$/;

export function TransferScreen({ track: trackParam, saved: savedParam }: { track?: string; saved?: string }) {
  const can = useCan();
  const bp = useBreakpoint();
  const tracks = useTracksQuery();
  const studyTracks = (tracks.data?.tracks ?? []).filter((t) => t.corridorId != null);
  const code = trackParam && studyTracks.some((t) => t.code === trackParam) ? trackParam : studyTracks[0]?.code;
  const savedId = savedParam && /^\d+$/.test(savedParam) ? Number(savedParam) : null;
  const [periodKey, setPeriodKey] = useState<string | null>('7d');
  const [period, setPeriod] = useState(() => periodEndingNow(7 * DAY_MS));
  const mayRun = can('runStudy');
  const live = useTransferStudyQuery(mayRun && code && savedId == null ? { track: code, ...period } : null);
  const saved = useSavedStudyQuery(savedId);
  const savedList = useSavedStudiesQuery();

  const study: TransferStudy | undefined = savedId != null ? saved.data?.saved.result : live.data?.study;
  const pending = savedId != null ? saved.isPending : live.isPending && live.fetchStatus !== 'idle';
  const error = savedId != null ? saved.error : live.error;

  const controls = (
    <Panel title="Study" testID="study-controls">
      {savedId != null && saved.data ? (
        <View style={styles.savedNote}>
          <Text variant="small">
            Showing the saved study <Text variant="small" bold>“{saved.data.saved.name}”</Text>, computed {formatDateTime(saved.data.saved.createdAt)}
            {saved.data.saved.createdBy ? ` by ${saved.data.saved.createdBy.displayName}` : ''}.
          </Text>
          {mayRun ? <Button title="Run a new study" kind="secondary" compact onPress={() => router.setParams({ saved: '' })} /> : null}
        </View>
      ) : (
        <>
          <SelectField
            label="Mode track"
            value={code ?? ''}
            onChange={(v) => router.setParams({ track: v, saved: '' })}
            options={studyTracks.map((t) => ({ value: t.code, label: t.name }))}
            testID="study-track"
          />
          <Text variant="small" bold style={styles.label}>
            Period
          </Text>
          <PeriodPicker
            label="Period"
            choices={STUDY_PERIODS}
            value={periodKey}
            onChange={(c) => {
              setPeriodKey(c.key);
              setPeriod(periodEndingNow(c.ms));
            }}
          />
          <CustomPeriod
            from={period.from}
            to={period.to}
            onApply={(p) => {
              setPeriodKey(null);
              setPeriod(p);
            }}
          />
        </>
      )}
    </Panel>
  );

  let result;
  if (!mayRun && savedId == null) {
    result = (
      <EmptyState title="Running a study is for planners, engineers and administrators" message="Saved studies are listed here for everyone; open one to read it." />
    );
  } else if (tracks.isPending || pending) {
    result = <LoadingState label="Running the transfer study…" />;
  } else if (tracks.error) {
    result = <ErrorState title="Could not load the mode tracks" message={errorMessage(tracks.error)} onRetry={() => void tracks.refetch()} />;
  } else if (!code && savedId == null) {
    result = <EmptyState title="No mode track has a corridor" message="Give a mode track its corridor under Network → Mode tracks to study its damping against the transfer." />;
  } else if (error && !study) {
    result = <ErrorState title="Could not run the study" message={errorMessage(error)} onRetry={() => void (savedId != null ? saved.refetch() : live.refetch())} />;
  } else if (!study) {
    result = <LoadingState label="Running the transfer study…" />;
  } else if (study.pointsTotal === 0) {
    result = (
      <EmptyState title="No scan windows with a transfer reading in this period" message={`Choose a longer period, or check that the ${study.corridor.name} flow channels are in the recordings.`} />
    );
  } else {
    result = <StudyResult study={study} wide={bp.isWide} updating={savedId == null && live.isFetching} />;
  }

  const side = (
    <View style={styles.stack}>
      {study && study.pointsTotal > 0 ? <ProjectionsPanel study={study} /> : null}
      {study && study.pointsTotal > 0 ? <ExportPanel study={study} mayExport={mayRun} saved={savedId != null} /> : null}
      {study && study.pointsTotal > 0 && savedId == null && mayRun ? <SavePanel study={study} /> : null}
      <SavedPanel list={savedList.data?.studies} pending={savedList.isPending} error={savedList.error} activeId={savedId} />
    </View>
  );

  return (
    <Screen title="Transfer study" intro="Damping against corridor transfer: where the fitted line reaches the low and poor thresholds, and the corridor angle against its practical limit.">
      <View style={styles.stack}>
        <Caution text={study?.caution ?? 'Advisory. A transfer study is reviewed by a qualified engineer before it changes any operating limit.'} testID="study-caution" />
        {bp.isWide ? (
          <Columns max={2} weights={[5, 3]}>
            <View style={styles.stack}>
              {controls}
              {result}
            </View>
            {side}
          </Columns>
        ) : (
          <>
            {controls}
            {study && study.pointsTotal > 0 ? <ProjectionsPanel study={study} /> : null}
            {result}
            {study && study.pointsTotal > 0 ? <ExportPanel study={study} mayExport={mayRun} saved={savedId != null} /> : null}
            {study && study.pointsTotal > 0 && savedId == null && mayRun ? <SavePanel study={study} /> : null}
            <SavedPanel list={savedList.data?.studies} pending={savedList.isPending} error={savedList.error} activeId={savedId} />
          </>
        )}
      </View>
    </Screen>
  );
}

function CustomPeriod({ from, to, onApply }: { from: string; to: string; onApply: (p: { from: string; to: string }) => void }) {
  const [a, setA] = useState(from.slice(0, 10));
  const [b, setB] = useState(to.slice(0, 10));
  const [err, setErr] = useState<{ a?: string; b?: string }>({});
  const apply = () => {
    const e: { a?: string; b?: string } = {};
    if (!DATE_RE.test(a) || Number.isNaN(Date.parse(`${a}T00:00:00Z`))) e.a = 'Write the date as YYYY-MM-DD, e.g. 2031-05-04';
    if (!DATE_RE.test(b) || Number.isNaN(Date.parse(`${b}T00:00:00Z`))) e.b = 'Write the date as YYYY-MM-DD, e.g. 2031-05-18';
    if (!e.a && !e.b && Date.parse(`${a}T00:00:00Z`) > Date.parse(`${b}T00:00:00Z`)) e.b = 'The end date must not be before the start date';
    setErr(e);
    if (e.a || e.b) return;
    // Whole UTC days: from the start of the first to the end of the last.
    onApply({ from: `${a}T00:00:00.000Z`, to: new Date(Date.parse(`${b}T00:00:00Z`) + DAY_MS).toISOString() });
  };
  return (
    <View style={styles.custom}>
      <View style={styles.customRow}>
        <View style={styles.customField}>
          <TextField label="From (UTC date)" value={a} onChangeText={setA} error={err.a} mono autoCapitalize="none" autoCorrect={false} placeholder="YYYY-MM-DD" />
        </View>
        <View style={styles.customField}>
          <TextField label="To (UTC date)" value={b} onChangeText={setB} error={err.b} mono autoCapitalize="none" autoCorrect={false} placeholder="YYYY-MM-DD" />
        </View>
      </View>
      <Button title="Use these dates" kind="secondary" compact onPress={apply} />
    </View>
  );
}

function projectionText(p: { x: number | null }): string {
  return p.x == null ? 'not reached' : formatMw(p.x);
}

function ProjectionsPanel({ study }: { study: TransferStudy }) {
  const low = study.damping.projections.find((p) => p.threshold === 'low');
  const poor = study.damping.projections.find((p) => p.threshold === 'poor');
  const at = study.angle.atLimit;
  const level = Math.round(study.confidenceLevel * 100);
  return (
    <Panel title="Projected transfer" testID="study-projections">
      <Text variant="small" muted style={styles.projIntro}>
        Where the fitted line crosses each threshold, {study.track.name} on {study.corridor.name}; {level} % interval.
      </Text>
      <View style={styles.projections}>
        {poor ? <ProjectionFigure testID="projection-poor" shape={bands.poor.shape} color={bands.poor.color} what={`Damping ${formatPercent(poor.y)} (poor)`} p={poor} level={level} /> : null}
        {low ? <ProjectionFigure testID="projection-low" shape={bands.low.shape} color={bands.low.color} what={`Damping ${formatPercent(low.y)} (low)`} p={low} level={level} /> : null}
        {at ? <ProjectionFigure testID="projection-angle" shape="∠" color={ANGLE_COLOR} what={`Corridor angle ${study.angle.limitDeg}° (practical limit)`} p={at} level={level} /> : null}
      </View>
      {study.damping.note ? (
        <Text variant="small" muted>
          {study.damping.note}
        </Text>
      ) : null}
    </Panel>
  );
}

interface ProjectionValue {
  x: number | null;
  lo: number | null;
  hi: number | null;
  se: number | null;
  extrapolated: boolean;
  note: string | null;
}

function ProjectionFigure({ what, p, level, shape, color, testID }: { what: string; p: ProjectionValue; level: number; shape: string; color: string; testID: string }) {
  return (
    <View style={[styles.proj, { borderLeftColor: color }]} testID={testID}>
      <Text variant="small" bold>
        <Text aria-hidden variant="small" color={color}>
          {shape}
        </Text>{' '}
        {what}
      </Text>
      <Num variant="title" bold testID={`${testID}-mw`}>
        {projectionText(p)}
      </Num>
      {p.x != null ? (
        <Text variant="small" muted>
          {level} % interval <Num variant="small">{formatMwRange(p.lo, p.hi)}</Num>
        </Text>
      ) : null}
      {p.x != null && p.se != null ? (
        <Text variant="small" muted>
          standard error <Num variant="small">{formatMw(p.se)}</Num>
        </Text>
      ) : null}
      {p.extrapolated ? (
        <Text variant="small" color={colors.inkMuted}>
          Beyond the transfers seen in this period: an extrapolation.
        </Text>
      ) : null}
      {p.note ? (
        <Text variant="small" muted>
          {p.note}
        </Text>
      ) : null}
    </View>
  );
}

function StudyResult({ study, wide, updating }: { study: TransferStudy; wide: boolean; updating: boolean }) {
  const t = study.track;
  // the drawn points include the windows at the lowest and highest transfer (the sample keeps them)
  const mws = study.points.map((p) => p.transferMw);
  const dFit = study.damping.fit;
  const aFit = study.angle.fit;
  const low = study.damping.projections.find((p) => p.threshold === 'low');
  const poor = study.damping.projections.find((p) => p.threshold === 'poor');
  const projections: Projection[] = [];
  if (low?.x != null) projections.push({ x: low.x, y: low.y, lo: low.lo, hi: low.hi, label: `${formatPercent(low.y)} at ${formatMw(low.x)}`, color: bands.low.color });
  if (poor?.x != null) projections.push({ x: poor.x, y: poor.y, lo: poor.lo, hi: poor.hi, label: `${formatPercent(poor.y)} at ${formatMw(poor.x)}`, color: bands.poor.color });
  const dampingLabel =
    `Damping ratio against ${study.corridor.name} transfer: ${study.pointsUsed} scan windows from ${formatMw(Math.min(...mws))} to ${formatMw(Math.max(...mws))}` +
    (study.pointsSampled ? `, ${study.pointsShown} of them drawn. ` : '. ') +
    (dFit ? `Fitted line falls ${(-dFit.slope * 100).toFixed(2)} % per 100 MW. ` : '') +
    `${poor?.x != null ? `Reaches ${formatPercent(poor.y)} at ${formatMw(poor.x)}` : `Does not reach ${formatPercent(t.poorBelow)}`}; ${low?.x != null ? `${formatPercent(low.y)} at ${formatMw(low.x)}` : `does not reach ${formatPercent(t.lowBelow)}`}. Threshold lines at ${formatPercent(t.lowBelow)} and ${formatPercent(t.poorBelow)}.`;
  const anglePts = study.points.filter((p) => p.angleDeg != null);
  const at = study.angle.atLimit;
  const angleProj: Projection[] = at?.x != null ? [{ x: at.x, y: at.y, lo: at.lo, hi: at.hi, label: `${study.angle.limitDeg}° at ${formatMw(at.x)}`, color: ANGLE_COLOR }] : [];
  const angleLabel = `Corridor angle against transfer: ${aFit?.n ?? anglePts.length} windows${study.pointsSampled ? `, ${anglePts.length} of them drawn` : ''}. ${at?.x != null ? `The fitted line reaches the ${study.angle.limitDeg}° practical limit at ${formatMw(at.x)}.` : `The line does not reach ${study.angle.limitDeg}°.`}`;
  return (
    <View style={styles.stack}>
      <Panel title="Damping against transfer" aside={updating ? <Text variant="caption" muted>Updating…</Text> : undefined} testID="study-damping">
        <ScatterChart
          label={dampingLabel}
          height={wide ? 340 : 300}
          x={{ title: `${study.corridor.name} transfer, MW` }}
          y={{ title: 'Damping ratio, %', include: [0] }}
          points={study.points.map((p) => {
            const band = p.forced ? 'forced' : p.dampingPercent < t.poorBelow ? 'poor' : p.dampingPercent < t.lowBelow ? 'low' : 'ample';
            const m = bandMarker(band);
            return { x: p.transferMw, y: p.dampingPercent, lo: p.dampingLo, hi: p.dampingHi, shape: m.shape, color: m.color };
          })}
          pointsLabel="Scan window (shape and colour: band)"
          fit={dFit ? { points: study.damping.line, label: 'Least-squares line', bandLabel: `${Math.round(study.confidenceLevel * 100)} % band of the line`, intercept: dFit.intercept, slope: dFit.slope } : undefined}
          refLines={[
            { y: t.lowBelow, label: `${formatPercent(t.lowBelow)} low`, color: bands.low.color },
            { y: t.poorBelow, label: `${formatPercent(t.poorBelow)} poor`, color: bands.poor.color },
          ]}
          projections={projections}
          testID="study-damping-chart"
        />
        {study.pointsSampled ? (
          <Text variant="caption" muted style={styles.fitLine} testID="study-sample-note">
            Showing {count(study.pointsShown)} of {count(study.pointsTotal)} windows (at each transfer level the lowest and highest damping and an even spread
            between); the fitted line and the projections use all {count(study.pointsTotal)}.
          </Text>
        ) : null}
        {dFit ? (
          <Text variant="caption" muted style={styles.fitLine}>
            Line: damping = {dFit.intercept.toFixed(2)} % {dFit.slope < 0 ? '−' : '+'} {Math.abs(dFit.slope * 100).toFixed(3)} % per 100 MW; r² {dFit.r2.toFixed(2)}; {dFit.n} windows, about {dFit.nEffective.toFixed(1)} independent (windows overlap).
            {study.pointsForced > 0 ? ` ${study.pointsForced} forced-oscillation windows left out.` : ''}
          </Text>
        ) : null}
      </Panel>
      <Panel title="Corridor angle against transfer" testID="study-angle">
        {anglePts.length === 0 ? (
          <Text variant="small" muted>
            {study.angle.note ?? 'No corridor angle readings in this period.'}
          </Text>
        ) : (
          <>
            <ScatterChart
              label={angleLabel}
              height={wide ? 280 : 250}
              x={{ title: `${study.corridor.name} transfer, MW` }}
              y={{ title: 'Corridor angle, °', include: [0, study.angle.limitDeg] }}
              points={anglePts.map((p) => ({ x: p.transferMw, y: p.angleDeg!, shape: 'dot' as const, color: ANGLE_COLOR }))}
              pointsLabel="Scan window"
              pointColor={ANGLE_COLOR}
              fit={aFit ? { points: study.angle.line, label: 'Least-squares line', bandLabel: 'Band of the line', intercept: aFit.intercept, slope: aFit.slope } : undefined}
              refLines={[{ y: study.angle.limitDeg, label: `${study.angle.limitDeg}° practical limit`, color: colors.ink, align: 'start' }]}
              projections={angleProj}
              testID="study-angle-chart"
            />
            <Text variant="caption" muted style={styles.fitLine}>
              Angle between the corridor's two ends. {study.angle.limitDeg}° is a common practical limit for steady-state angle across a corridor.
              {study.angle.note ? ` ${study.angle.note}` : ''}
            </Text>
          </>
        )}
      </Panel>
    </View>
  );
}

function ExportPanel({ study, mayExport, saved }: { study: TransferStudy; mayExport: boolean; saved: boolean }) {
  return (
    <Panel title="Export">
      <View style={styles.exportBody}>
        {mayExport ? (
          <>
            <DownloadLink
              href={studyCsvUrl(study)}
              title="Download CSV"
              fileName={studyCsvName(study)}
              label={`Download the ${study.pointsTotal} windows of this study as CSV`}
            />
            <Text variant="caption" muted>
              Every window of the period, one row each: start and end (UTC), transfer (MW), damping and its interval (%), corridor angle (°).
              {saved ? ' The file is read from the estimates as they are now, which may differ from when the study was saved.' : ''}
            </Text>
          </>
        ) : (
          <Text variant="small" muted>
            Downloading the windows of a study is for planners, engineers and administrators.
          </Text>
        )}
      </View>
    </Panel>
  );
}

/** Whole numbers with thousands separators, as the other screens write counts. */
function count(n: number): string {
  return n.toLocaleString('en-US');
}

function SavePanel({ study }: { study: TransferStudy }) {
  const save = useSaveStudyMutation();
  const defaultName = `${study.track.name} against ${study.corridor.name}, ${study.from.slice(0, 10)} to ${study.to.slice(0, 10)}`;
  const [name, setName] = useState(defaultName);
  const [savedAs, setSavedAs] = useState<SavedStudySummary | null>(null);
  const fieldErr = save.error instanceof ApiError ? save.error.fieldErrors().name : undefined;
  const formErr = save.error && !fieldErr ? errorMessage(save.error) : undefined;
  return (
    <Panel title="Save">
      {savedAs ? <Notice kind="ok">Saved as “{savedAs.name}”.</Notice> : null}
      {formErr ? <Notice kind="error">{formErr}</Notice> : null}
      <TextField label="Name" value={name} onChangeText={setName} error={fieldErr} required maxLength={200} />
      <Button
        title="Save study"
        busy={save.isPending}
        onPress={() =>
          save.mutate(
            { name, track: study.track.code, from: study.from, to: study.to },
            { onSuccess: (r) => setSavedAs(r.saved) },
          )
        }
      />
      <Text variant="caption" muted style={styles.saveNote}>
        The server runs the study again and keeps exactly what it computed.
      </Text>
    </Panel>
  );
}

function SavedPanel({ list, pending, error, activeId }: { list?: SavedStudySummary[]; pending: boolean; error: unknown; activeId: number | null }) {
  return (
    <Panel title="Saved studies" testID="saved-studies">
      {pending ? (
        <LoadingState label="Loading saved studies…" />
      ) : error && !list ? (
        <ErrorState title="Could not load the saved studies" message={errorMessage(error)} />
      ) : !list || list.length === 0 ? (
        <Text variant="small" muted>
          None saved yet.
        </Text>
      ) : (
        <View role="list" aria-label="Saved studies" style={styles.savedList}>
          {list.map((s) => (
            <View role="listitem" key={s.id} style={[styles.savedItem, s.id === activeId && styles.savedActive]}>
              <Text variant="small" bold>
                {s.name}
              </Text>
              <Text variant="caption" muted>
                {s.trackCode} · {s.from.slice(0, 10)} to {s.to.slice(0, 10)} · {s.createdBy?.displayName ?? 'someone'}, {formatDateTime(s.createdAt)}
              </Text>
              <Text variant="caption">
                {formatPercent(3)}-line: <Num variant="caption">{formatMw(s.poorAtMw)}</Num> · {formatPercent(5)}-line: <Num variant="caption">{formatMw(s.lowAtMw)}</Num>
              </Text>
              <Button title="Open" compact kind="quiet" label={`Open the saved study ${s.name}`} onPress={() => router.setParams({ saved: String(s.id) })} />
            </View>
          ))}
        </View>
      )}
    </Panel>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  label: { marginBottom: space.xs },
  savedNote: { gap: space.sm },
  custom: { marginTop: space.lg, gap: space.xs },
  customRow: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md },
  customField: { flexGrow: 1, flexBasis: 140 },
  projIntro: { marginBottom: space.md },
  projections: { gap: space.md },
  proj: { borderLeftWidth: 4, paddingLeft: space.md, gap: 2, borderRadius: radii.sm },
  fitLine: { marginTop: space.sm },
  exportBody: { gap: space.xs },
  saveNote: { marginTop: space.sm },
  savedList: { gap: space.sm },
  savedItem: { gap: 2, borderBottomWidth: 1, borderBottomColor: colors.rule, paddingBottom: space.sm },
  savedActive: { backgroundColor: colors.accentSoft },
});
