// The network model through the API: reads for everyone, edits for admins and engineers, each
// checked as a whole, audited, and never losing what still refers to a row.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TARROW_AREAS, TARROW_CHANNELS, TARROW_CORRIDORS, TARROW_SITES, TARROW_TRACKS } from '../../fixtures/tarrow-network';
import { networkResponseSchema } from '../../shared/api/network';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

let stack: Stack;
let engineer: Client;
beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
  engineer = createClient(stack.baseUrl);
  expect((await engineer.signIn(ROLE_EMAIL.engineer, DEMO_PASSWORD)).status).toBe(200);
});
afterAll(async () => {
  await stack?.stop();
});

describe('network', () => {
  it('serves the seeded Tarrow network in one answer, to any role', async () => {
    const op = createClient(stack.baseUrl);
    await op.signIn(ROLE_EMAIL.operator, DEMO_PASSWORD);
    const r = await op.get('/api/network');
    expect(r.status).toBe(200);
    const net = networkResponseSchema.parse(r.body);
    expect(net.areas.map((a) => a.code)).toEqual(TARROW_AREAS.map((a) => a.code));
    expect(net.sites).toHaveLength(TARROW_SITES.length);
    expect(net.pmus).toHaveLength(TARROW_SITES.length);
    expect(net.channels.map((c) => c.name).sort()).toEqual(TARROW_CHANNELS.map((c) => c.name).sort());
    const hs = net.corridors.find((c) => c.code === 'highmoor-saltreach')!;
    const byId = new Map(net.channels.map((c) => [c.id, c.name]));
    expect(byId.get(hs.flowChannelId!)).toBe(TARROW_CORRIDORS[0].flowChannel);
    const ns = net.tracks.find((t) => t.code === 'north-south')!;
    expect(ns).toMatchObject({ minHz: 0.2, maxHz: 0.45, poorBelow: 3, lowBelow: 5, corridorId: hs.id, latestEstimate: null });
    expect(ns.reference).toEqual(TARROW_TRACKS[0].reference);
  });

  it('creates, changes and deletes a site, writing each change to the audit log', async () => {
    const area = (await stack.pool.query(`select id from areas where code = 'eastfell'`)).rows[0].id as number;
    const created = await engineer.post('/api/network/sites', { code: 'ashby-cross', name: 'Ashby Cross', areaId: area, kV: 345, x: 80, y: 30 });
    expect(created.status).toBe(201);
    const id = created.body.site.id as number;
    const changed = await engineer.patch(`/api/network/sites/${id}`, { name: 'Ashby Crossing', kV: 500 });
    expect(changed.status).toBe(200);
    expect(changed.body.site).toMatchObject({ code: 'ashby-cross', name: 'Ashby Crossing', kV: 500, x: 80 });
    const deleted = await engineer.del(`/api/network/sites/${id}`);
    expect(deleted.status).toBe(200);
    expect((await engineer.get('/api/network/sites')).body.sites.some((s: { id: number }) => s.id === id)).toBe(false);
    const audit = await stack.pool.query(`select action, details from audit_log where target = 'site:ashby-cross' order by id`);
    expect(audit.rows.map((r) => r.action)).toEqual(['network.create', 'network.update', 'network.delete']);
    expect(audit.rows[1].details.changed).toEqual({ name: { from: 'Ashby Cross', to: 'Ashby Crossing' }, kV: { from: 345, to: 500 } });
  });

  it('refuses to delete what is still referred to (409) and keeps it', async () => {
    const site = (await stack.pool.query(`select id from sites where code = 'moorgate'`)).rows[0].id as number;
    const before = await rowCounts(stack.pool);
    const r = await engineer.del(`/api/network/sites/${site}`);
    expect(r.status).toBe(409);
    expect(r.body.error.code).toBe('CONFLICT');
    expect(r.body.error.message).toBe('Cannot delete site "Moorgate": 1 PMU, 3 channels, 1 corridor still refer to it');
    expect(await rowCounts(stack.pool)).toEqual(before);
  });

  it('refuses a duplicate code with 409 naming the field', async () => {
    const r = await engineer.post('/api/network/areas', { code: 'highmoor', name: 'Second Highmoor' });
    expect(r.status).toBe(409);
    expect(r.body.error).toEqual({
      code: 'CONFLICT',
      message: 'An area with code "highmoor" already exists',
      details: [{ path: 'code', message: 'Already in use' }],
    });
  });

  it('checks references as a whole: a corridor flow channel must be a flow channel at one of its ends', async () => {
    const q = async (sql: string) => (await stack.pool.query(sql)).rows[0].id as number;
    const from = await q(`select id from sites where code = 'tarrow-central'`);
    const to = await q(`select id from sites where code = 'millbrook'`);
    const angle = await q(`select id from channels where name = 'tarrow-central.angle'`);
    const farFlow = await q(`select id from channels where name = 'moorgate.mw'`);
    const r = await engineer.post('/api/network/corridors', { code: 'valley-link', name: 'Valley link', fromSiteId: from, toSiteId: to, kV: 230, flowChannelId: angle, toAngleChannelId: angle });
    expect(r.status).toBe(400);
    expect(r.body.error.details).toEqual([
      { path: 'flowChannelId', message: 'Must be a flow channel (this one is angle)' },
      { path: 'toAngleChannelId', message: "Must be measured at the corridor's to site" },
    ]);
    const r2 = await engineer.post('/api/network/corridors', { code: 'valley-link', name: 'Valley link', fromSiteId: from, toSiteId: to, kV: 230, flowChannelId: farFlow });
    expect(r2.body.error.details).toEqual([{ path: 'flowChannelId', message: 'Must be measured at one end of the corridor' }]);
    const ok = await engineer.post('/api/network/corridors', { code: 'valley-link', name: 'Valley link', fromSiteId: from, toSiteId: to, kV: 230, fromAngleChannelId: angle });
    expect(ok.status).toBe(201);
  });

  it('lists each track with its latest estimate and the band from the track’s own thresholds', async () => {
    const track = (await stack.pool.query(`select id from mode_tracks where code = 'north-south'`)).rows[0].id as number;
    const rec = await stack.pool.query(`insert into recordings (file_name, checksum, format) values ('a.csv', 'abc', 'csv') returning id`);
    const an = await stack.pool.query(`insert into analyses (kind, recording_id) values ('scan', $1) returning id`, [rec.rows[0].id]);
    const win = async (minute: number) =>
      (
        await stack.pool.query(
          `insert into scan_windows (analysis_id, start_time, end_time) values ($1, timestamptz '2026-03-02 10:00Z' + make_interval(mins => $2), timestamptz '2026-03-02 10:20Z' + make_interval(mins => $2)) returning id`,
          [an.rows[0].id, minute],
        )
      ).rows[0].id as number;
    const est = (w: number, at: string, damping: number) =>
      stack.pool.query(
        `insert into mode_estimates (window_id, track_id, at, frequency_hz, damping_percent, damping_lo, damping_hi, method) values ($1, $2, $3, 0.31, $4::float8, $4::float8 - 0.9, $4::float8 + 0.9, 'yule-walker')`,
        [w, track, at, damping],
      );
    await est(await win(0), '2026-03-02T10:20:00Z', 6.1);
    await est(await win(1), '2026-03-02T10:21:00Z', 2.8);
    const r = await engineer.get('/api/network/tracks');
    const ns = r.body.tracks.find((t: { code: string }) => t.code === 'north-south');
    expect(ns.latestEstimate).toMatchObject({ at: '2026-03-02T10:21:00.000Z', frequencyHz: 0.31, dampingPercent: 2.8, band: 'poor', forced: false });
    expect(ns.latestEstimate.dampingLo).toBeCloseTo(1.9, 10);
    // Raising the poor threshold is an edit of the track, and the band follows it.
    await engineer.patch(`/api/network/tracks/${track}`, { poorBelow: 2.5 });
    const after = (await engineer.get('/api/network/tracks')).body.tracks.find((t: { code: string }) => t.code === 'north-south');
    expect(after.latestEstimate.band).toBe('low');
    // A track with estimates cannot be deleted.
    const del = await engineer.del(`/api/network/tracks/${track}`);
    expect(del.status).toBe(409);
    expect(del.body.error.message).toBe('Cannot delete mode track "North–south": 2 mode estimates still refer to it');
  });
});
