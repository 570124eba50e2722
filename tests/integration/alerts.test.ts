// The alert chain end to end: a recording simulated at high Highmoor–Saltreach transfer (the
// north–south mode under 3 %: the poor band of the common 3–5 % rule, common practice) opens an
// alert and e-mails the track's subscribers through the local SMTP sink (outbox_messages); an
// operator acknowledges it with a note; another hour at high transfer keeps it poor for ten more
// windows, so it escalates (open again, a new e-mail); a later recording at low transfer clears it
// (another e-mail). The low-transfer recording also carries a sustained 0.70 Hz forced oscillation in the
// east–west band: it raises a 'forced' alert and never counts as poor damping.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trackMode, buildTarrowModel, simulateAmbient } from '../../modal/simulator';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, waitFor } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { ambientRecord, collectEvents, csvOf, TEST_CHANNELS, uploadReady, waitForAnalysis, type EventCollector } from './analysis-helpers';

const HIGH_MW = 2950;
const LOW_MW = 600;
const S1 = Date.UTC(2025, 3, 1, 0, 0, 0) / 1000;
const S1B = S1 + 3600;
const S2 = S1 + 3 * 3600;
const WINDOW = 1200;
const STEP = 60;

let stack: Stack;
let engineer: Client;
let operator: Client;
let planner: Client;
let events: EventCollector;
let alertId: number;

async function signedIn(role: keyof typeof ROLE_EMAIL): Promise<Client> {
  const c = createClient(stack.baseUrl);
  const r = await c.signIn(ROLE_EMAIL[role], DEMO_PASSWORD);
  if (r.status !== 200) throw new Error(`sign-in as ${role} answered ${r.status}`);
  return c;
}

async function mails(to: string): Promise<{ subject: string; text: string }[]> {
  const r = await stack.pool.query(`select subject, text from outbox_messages where "to" ilike $1 order by id`, [`%${to}%`]);
  return r.rows;
}

beforeAll(async () => {
  stack = await startStack();
  // operator and engineer follow the north–south track; the planner follows nothing
  await stack.pool.query(
    `insert into track_subscriptions (person_id, track_id)
     select p.id, t.id from people p, mode_tracks t where p.email in ($1, $2) and t.code = 'north-south'`,
    [ROLE_EMAIL.operator, ROLE_EMAIL.engineer],
  );
  engineer = await signedIn('engineer');
  operator = await signedIn('operator');
  planner = await signedIn('planner');
  events = await collectEvents(stack, operator);
}, 120_000);

afterAll(async () => {
  events?.close();
  await stack?.stop();
});

describe('a poorly damped north–south mode', () => {
  it('opens an alert after three poor windows and e-mails the subscribers', async () => {
    const { model, record } = ambientRecord(HIGH_MW, { minutes: 30, seed: 41, start: S1 });
    expect(trackMode(model, 'north-south')!.dampingPercent).toBeLessThan(3); // the simulator's truth
    const rec = await uploadReady(stack, engineer, 'tarrow-high.csv', csvOf(record));
    const scan = await waitForAnalysis(engineer, rec, 'scan');
    expect(scan.status).toBe('done');
    const alerts = await waitFor(async () => {
      const r = await operator.get('/api/alerts?track=north-south');
      return r.body.alerts.length > 0 ? r.body.alerts : undefined;
    }, 'the north–south alert');
    expect(alerts).toHaveLength(1);
    const a = alerts[0];
    alertId = a.id;
    expect(a.kind).toBe('poor');
    expect(a.state).toBe('open');
    expect(a.level).toBe(1);
    // three consecutive poor windows from the first: opened at the end of the third window
    expect(Date.parse(a.openedAt)).toBe((S1 + 2 * STEP + WINDOW) * 1000);
    expect(a.worstDamping).toBeLessThan(3);
    expect(a.clearedAt).toBeNull();
    // only the north–south track is poorly damped at this transfer
    const all = await operator.get('/api/alerts');
    expect(all.body.alerts.filter((x: { kind: string }) => x.kind === 'poor')).toHaveLength(1);

    const opMail = await waitFor(async () => (await mails(ROLE_EMAIL.operator)).find((m) => m.subject.includes('Alert opened')), 'the opened e-mail');
    expect(opMail.subject).toBe('[Keel] Alert opened: North–south — poorly damped mode');
    expect(opMail.text).toContain(`/alerts/${alertId}`);
    expect(opMail.text).toMatch(/Lowest damping while open: \d\.\d %/);
    await waitFor(async () => (await mails(ROLE_EMAIL.engineer)).some((m) => m.subject.includes('Alert opened')), 'the engineer e-mail');
    expect(await mails(ROLE_EMAIL.planner)).toEqual([]);
  });

  it('shows the alert with its damping trace, worst mode shape, notifications and history', async () => {
    const r = await planner.get(`/api/alerts/${alertId}`);
    expect(r.status).toBe(200);
    expect(r.body.caution).toMatch(/advisory/i);
    expect(r.body.trace.length).toBeGreaterThanOrEqual(11);
    // The worst is a window of the alert (its opening streak or later): the trace holds it, and no
    // natural estimate from the opening on is lower.
    type P = { at: string; dampingPercent: number; forced: boolean };
    const atWorst = r.body.trace.find((p: P) => p.at === r.body.worstAt);
    expect(atWorst?.dampingPercent).toBeCloseTo(r.body.alert.worstDamping, 9);
    const sinceOpen = r.body.trace.filter((p: P) => !p.forced && Date.parse(p.at) >= Date.parse(r.body.alert.openedAt));
    expect(sinceOpen.length).toBeGreaterThan(0);
    expect(Math.min(...sinceOpen.map((p: P) => p.dampingPercent))).toBeGreaterThanOrEqual(r.body.alert.worstDamping);
    expect(r.body.worstShape.length).toBeGreaterThan(5);
    expect(r.body.worstAt).not.toBeNull();
    const told = r.body.notifications.map((n: { email: string; event: string }) => `${n.email}:${n.event}`).sort();
    expect(told).toEqual([`${ROLE_EMAIL.engineer}:opened`, `${ROLE_EMAIL.operator}:opened`]);
    expect(r.body.history.map((h: { action: string }) => h.action)).toEqual(['alert.opened']);
    expect(r.body.alert.durationSeconds).toBeGreaterThan(0);
  });

  it('is pushed to listeners as a live event', async () => {
    await waitFor(async () => events.events.some((e) => e.type === 'alert.opened' && e.data.alertId === alertId), 'the alert.opened event');
    const e = events.events.find((x) => x.type === 'alert.opened')!;
    expect(e.data.trackCode).toBe('north-south');
    expect(e.data.kind).toBe('poor');
  });

  it('is acknowledged by an operator with a note (not by a planner), once, in the audit log', async () => {
    expect((await planner.post(`/api/alerts/${alertId}/acknowledge`, { note: 'seen' })).status).toBe(403);
    const empty = await operator.post(`/api/alerts/${alertId}/acknowledge`, { note: '   ' });
    expect(empty.status).toBe(400);
    expect(empty.body.error.details).toEqual([{ path: 'note', message: 'A note is required: say what you saw or did' }]);
    const ok = await operator.post(`/api/alerts/${alertId}/acknowledge`, { note: 'Reduced Highmoor–Saltreach schedule by 300 MW per procedure.' });
    expect(ok.status).toBe(200);
    expect(ok.body.alert.state).toBe('acknowledged');
    expect(ok.body.alert.acknowledgedBy.displayName).toBe('Demo Operator');
    expect(ok.body.alert.note).toBe('Reduced Highmoor–Saltreach schedule by 300 MW per procedure.');
    const again = await engineer.post(`/api/alerts/${alertId}/acknowledge`, { note: 'me too' });
    expect(again.status).toBe(409);
    const d = await operator.get(`/api/alerts/${alertId}`);
    const ack = d.body.history.find((h: { action: string }) => h.action === 'alert.acknowledged');
    expect(ack.displayName).toBe('Demo Operator');
    expect(ack.details.note).toBe('Reduced Highmoor–Saltreach schedule by 300 MW per procedure.');
    await waitFor(async () => events.events.some((e) => e.type === 'alert.acknowledged' && e.data.alertId === alertId), 'the acknowledged event');
    expect((await operator.get('/api/alerts?state=acknowledged')).body.alerts.map((a: { id: number }) => a.id)).toEqual([alertId]);
  });
});

describe('the mode staying poor', () => {
  it('escalates the alert after ten more poor windows: open again, note kept, e-mailed', async () => {
    const { record } = ambientRecord(HIGH_MW, { minutes: 30, seed: 43, start: S1B });
    const rec = await uploadReady(stack, engineer, 'tarrow-high-2.csv', csvOf(record));
    expect((await waitForAnalysis(engineer, rec, 'scan')).status).toBe('done');
    const a = await waitFor(async () => {
      const r = await operator.get(`/api/alerts/${alertId}`);
      return r.body.alert.level === 2 ? r.body : undefined;
    }, 'the escalation');
    // the hour's gap restarts the count: the tenth poor window of the new recording escalates
    expect(Date.parse(a.alert.escalatedAt)).toBe((S1B + 9 * STEP + WINDOW) * 1000);
    expect(a.alert.state).toBe('open');
    expect(a.alert.note).toBe('Reduced Highmoor–Saltreach schedule by 300 MW per procedure.');
    expect(a.history.map((h: { action: string }) => h.action)).toEqual(['alert.opened', 'alert.acknowledged', 'alert.escalated']);
    expect(a.history[2].details.reason).toBe('persisted');
    await waitFor(
      async () => (await mails(ROLE_EMAIL.operator)).some((m) => m.subject === '[Keel] Alert escalated: North–south — poorly damped mode'),
      'the escalated e-mail',
    );
    expect((await operator.get('/api/alerts?track=north-south')).body.alerts).toHaveLength(1); // the same alert
  });
});

describe('a later recording at low transfer', () => {
  it('clears the alert after three windows at or above 5 %, and e-mails again', async () => {
    const model = buildTarrowModel(LOW_MW);
    expect(trackMode(model, 'north-south')!.dampingPercent).toBeGreaterThan(5);
    const record = simulateAmbient(model, {
      minutes: 30,
      seed: 42,
      startTime: S2,
      channels: TEST_CHANNELS,
      forced: { frequencyHz: 0.7, amplitude: 5, site: 'windlow' },
    });
    const rec = await uploadReady(stack, engineer, 'tarrow-low.csv', csvOf(record));
    expect((await waitForAnalysis(engineer, rec, 'scan')).status).toBe('done');
    const a = await waitFor(async () => {
      const r = await operator.get(`/api/alerts/${alertId}`);
      return r.body.alert.state === 'cleared' ? r.body.alert : undefined;
    }, 'the alert to clear');
    // the three-hour gap restarts the counts: three good windows of the new recording clear it
    expect(Date.parse(a.clearedAt)).toBe((S2 + 2 * STEP + WINDOW) * 1000);
    expect(a.note).toBe('Reduced Highmoor–Saltreach schedule by 300 MW per procedure.'); // kept
    await waitFor(async () => (await mails(ROLE_EMAIL.operator)).some((m) => m.subject === '[Keel] Alert cleared: North–south — poorly damped mode'), 'the cleared e-mail');
    const watch = await operator.get('/api/watch');
    expect(watch.body.tracks.find((t: { code: string }) => t.code === 'north-south').openAlerts).toEqual([]);
  });

  it("raises a 'forced' alert for the forced oscillation, never a poor-damping one", async () => {
    const r = await waitFor(async () => {
      const x = await operator.get('/api/alerts?track=east-west');
      return x.body.alerts.length ? x.body.alerts : undefined;
    }, 'the east–west forced alert');
    expect(r.map((a: { kind: string }) => a.kind)).toEqual(['forced']);
    expect(r[0].worstDamping).toBeNull();
    expect(r[0].state).toBe('open');
    const est = await operator.get(`/api/tracks/east-west/estimates?from=${new Date(S2 * 1000).toISOString()}&to=${new Date((S2 + 7200) * 1000).toISOString()}`);
    const forced = est.body.points.filter((p: { forced: boolean }) => p.forced);
    expect(forced.length).toBeGreaterThanOrEqual(3);
    for (const p of forced) expect(p.band).toBe('forced');
  });

  it('evaluating again (a second scan of the same data) changes no alert and sends no e-mail', async () => {
    const before = (await stack.pool.query('select count(*)::int as n from outbox_messages')).rows[0].n;
    const alertsBefore = (await operator.get('/api/alerts')).body.alerts;
    const recs = await engineer.get('/api/analyses?kind=scan');
    const recordingId = recs.body.analyses[0].recordingId as number;
    const r = await engineer.post(`/api/recordings/${recordingId}/scans`, { settings: {} });
    expect(r.status).toBe(201);
    await waitFor(async () => {
      const a = await engineer.get(`/api/analyses/${r.body.analysis.id}`);
      return a.body.analysis.status === 'done';
    }, 'the second scan', 120_000);
    await new Promise((res) => setTimeout(res, 3000)); // the evaluation job runs after the scan
    const alertsAfter = (await operator.get('/api/alerts')).body.alerts;
    const strip = (xs: { durationSeconds: number }[]) => xs.map(({ durationSeconds: _, ...rest }) => rest);
    expect(strip(alertsAfter)).toEqual(strip(alertsBefore));
    expect((await stack.pool.query('select count(*)::int as n from outbox_messages')).rows[0].n).toBe(before);
  });
});
