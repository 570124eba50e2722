// The audit log records every state change made through the API: one case per state-changing
// route of the catalogue (shared/api/endpoints.ts — the table's type makes a new route without a
// case a compile error, and a test checks the same at run time). Each case makes a request that
// succeeds and finds the entry it wrote: the action, who acted (the caller, the person the action
// created or concerned, or nobody for an anonymous request), what was acted on, and the address.
// Sign-ins, role changes, uploads, scans and acknowledgements are among them; auth.test.ts and
// alerts.test.ts check the details of sign-in failures, disabling and the alert history.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildPath } from '../../shared/api/common';
import { ENDPOINT_KEYS, ENDPOINTS, STATE_CHANGING_METHODS, type EndpointKey } from '../../shared/api/endpoints';
import type { Role } from '../../shared/roles';
import { csvText, tarrowSeries } from '../fixtures-bad/make-files';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, insertInvitation, insertPasswordReset, insertPerson, ROLE_EMAIL, unique } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

type StateChangingKey = { [K in EndpointKey]: (typeof ENDPOINTS)[K]['method'] extends 'GET' ? never : K }[EndpointKey];

interface Request {
  params?: Record<string, string | number>;
  body?: unknown;
  /** A multipart upload of one file instead of a JSON body. */
  upload?: { name: string; content: string };
  /** Whom the entry must name when it is not the caller (null: nobody). */
  person?: number | null;
}

interface AuditCase {
  caller: Role | 'anonymous';
  action: string;
  /** The target, or a pattern for it (null: none). */
  target: RegExp | null;
  request(s: Stack): Promise<Request>;
}

const T0 = Date.UTC(2025, 2, 3, 0, 0, 0) / 1000;
const iso = (t: number) => new Date(t * 1000).toISOString();
let ids: { area: number; site: number; otherSite: number } = null as never;

const one = async (s: Stack, sql: string, params: unknown[] = []) => (await s.pool.query(sql, params)).rows[0].id as number;
const freshArea = (s: Stack) => one(s, `insert into areas (code, name) values ($1, 'Scratch') returning id`, [unique('audit')]);
const freshSite = (s: Stack) =>
  one(s, `insert into sites (code, name, area_id, kv, x, y) values ($1, 'Scratch', $2, 230, 1, 1) returning id`, [unique('audit'), ids.area]);
const freshPmu = (s: Stack) =>
  one(s, `insert into pmus (code, name, site_id, reporting_rate) values ($1, 'Scratch', $2, 30) returning id`, [unique('audit'), ids.site]);
const freshChannel = (s: Stack) =>
  one(s, `insert into channels (name, site_id, kind, unit) values ($1, $2, 'frequency', 'Hz') returning id`, [unique('audit.freq'), ids.site]);
const freshCorridor = (s: Stack) =>
  one(s, `insert into corridors (code, name, from_site_id, to_site_id, kv) values ($1, 'Scratch', $2, $3, 345) returning id`, [
    unique('audit'),
    ids.site,
    ids.otherSite,
  ]);
const freshTrack = (s: Stack) => one(s, `insert into mode_tracks (code, name, min_hz, max_hz) values ($1, 'Scratch', 2, 3) returning id`, [unique('audit')]);

/** A ready 20-minute recording of two channels, made in the database (no samples: enough to queue jobs). */
async function readyRecording(s: Stack): Promise<number> {
  const id = await one(
    s,
    `insert into recordings (file_name, checksum, format, size_bytes, start_time, end_time, rate, channel_count, sample_count, status, quality)
     values ('audit.csv', md5(random()::text) || md5(random()::text), 'csv', 1, $1, $2, 30, 2, 36000, 'ready', $3) returning id`,
    [iso(T0), iso(T0 + 1199.9667), JSON.stringify({ chunkSize: 3600, startEpoch: T0, rows: 36000, duplicates: 0, gaps: 0, missingFrames: 0 })],
  );
  await s.pool.query(
    `insert into recording_channels (recording_id, channel_id, source_name, column_index)
     select $1, c.id, c.name, row_number() over (order by c.name) from channels c where c.name in ('moorgate.angle', 'saltreach-bay.angle')`,
    [id],
  );
  return id;
}

const openAlert = (s: Stack) =>
  one(s, `insert into alerts (track_id, kind, state, opened_at, worst_damping) select t.id, 'poor', 'open', $1, 2.1 from mode_tracks t where t.code = 'north-south' returning id`, [
    iso(T0 + Math.floor(Math.random() * 1e6)),
  ]);

function network<P extends string>(
  plural: P,
  kind: string,
  fresh: (s: Stack) => Promise<number>,
  create: () => unknown,
  change: unknown,
): Record<`${P}.create` | `${P}.update` | `${P}.remove`, AuditCase> {
  const target = new RegExp(`^${kind}:`);
  const createCase: AuditCase = { caller: 'engineer', action: 'network.create', target, request: async () => ({ body: create() }) };
  const updateCase: AuditCase = { caller: 'engineer', action: 'network.update', target, request: async (s) => ({ params: { id: await fresh(s) }, body: change }) };
  const removeCase: AuditCase = { caller: 'engineer', action: 'network.delete', target, request: async (s) => ({ params: { id: await fresh(s) } }) };
  return { [`${plural}.create`]: createCase, [`${plural}.update`]: updateCase, [`${plural}.remove`]: removeCase } as Record<
    `${P}.create` | `${P}.update` | `${P}.remove`,
    AuditCase
  >;
}

const CASES: Record<StateChangingKey, AuditCase> = {
  'auth.signIn': {
    caller: 'anonymous',
    action: 'auth.sign-in',
    target: /^person:\d+$/,
    request: async (s) => ({
      body: { email: ROLE_EMAIL.planner, password: DEMO_PASSWORD },
      person: await one(s, 'select id from people where email = $1', [ROLE_EMAIL.planner]),
    }),
  },
  'auth.signOut': { caller: 'engineer', action: 'auth.sign-out', target: /^person:\d+$/, request: async () => ({ body: {} }) },
  'people.update': { caller: 'admin', action: 'person.role', target: /^person:\d+$/, request: async (s) => ({ params: { id: await insertPerson(s.pool) }, body: { role: 'operator' } }) },
  'invitations.create': { caller: 'admin', action: 'invitation.create', target: /^invitation:\d+$/, request: async () => ({ body: { email: `${unique('audit')}@tarrow.example`, role: 'operator' } }) },
  'invitations.revoke': { caller: 'admin', action: 'invitation.revoke', target: /^invitation:\d+$/, request: async (s) => ({ params: { id: (await insertInvitation(s.pool)).id } }) },
  'invitations.accept': {
    caller: 'anonymous',
    action: 'invitation.accept',
    target: /^invitation:\d+$/,
    // the entry names the person the acceptance created (checked against the answer below)
    request: async (s) => ({ body: { token: (await insertInvitation(s.pool)).token, displayName: 'New Colleague', password: 'a-long-new-password' } }),
  },
  'passwordReset.request': {
    caller: 'anonymous',
    action: 'password-reset.request',
    target: /^person:\d+$/,
    request: async () => ({ body: { email: ROLE_EMAIL.operator }, person: null }),
  },
  'passwordReset.complete': {
    caller: 'anonymous',
    action: 'password-reset.complete',
    target: /^person:\d+$/,
    request: async (s) => {
      const r = await insertPasswordReset(s.pool);
      return { body: { token: r.token, password: 'another-new-password' }, person: r.personId };
    },
  },
  ...network('areas', 'area', freshArea, () => ({ code: unique('area'), name: 'New area' }), { name: 'Renamed' }),
  ...network('sites', 'site', freshSite, () => ({ code: unique('site'), name: 'New site', areaId: ids.area, kV: 230, x: 10, y: 20 }), { kV: 345 }),
  ...network('pmus', 'pmu', freshPmu, () => ({ code: unique('pmu'), name: 'New PMU', siteId: ids.site, reportingRate: 30 }), { reportingRate: 60 }),
  ...network('channels', 'channel', freshChannel, () => ({ name: unique('new.freq'), siteId: ids.site, kind: 'frequency', unit: 'Hz' }), { description: 'Changed' }),
  ...network('corridors', 'corridor', freshCorridor, () => ({ code: unique('corridor'), name: 'New corridor', fromSiteId: ids.site, toSiteId: ids.otherSite, kV: 345 }), {
    kV: 500,
  }),
  ...network('tracks', 'track', freshTrack, () => ({ code: unique('track'), name: 'New track', minHz: 1.7, maxHz: 1.9 }), { lowBelow: 6 }),
  'scans.create': { caller: 'engineer', action: 'scan.start', target: /^analysis:\d+$/, request: async (s) => ({ params: { id: await readyRecording(s) }, body: { settings: {} } }) },
  'fits.create': {
    caller: 'engineer',
    action: 'fit.start',
    target: /^analysis:\d+$/,
    request: async (s) => ({ params: { id: await readyRecording(s) }, body: { from: iso(T0 + 10), to: iso(T0 + 30) } }),
  },
  'alerts.acknowledge': { caller: 'operator', action: 'alert.acknowledged', target: /^alert:\d+$/, request: async (s) => ({ params: { id: await openAlert(s) }, body: { note: 'Seen; following the procedure.' } }) },
  'studies.save': {
    caller: 'planner',
    action: 'study.save',
    target: /^study:\d+$/,
    request: async () => ({ body: { name: 'Audit check', track: 'north-south', from: iso(T0 - 3600), to: iso(T0 + 86_400) } }),
  },
  'recordings.upload': {
    caller: 'engineer',
    action: 'recording.upload',
    target: /^recording:\d+$/,
    request: async () => ({ upload: { name: 'audited.csv', content: csvText(tarrowSeries(60, 30, T0 + 7 * 86_400)) } }),
  },
  'recordings.remove': { caller: 'engineer', action: 'recording.delete', target: /^recording:\d+$/, request: async (s) => ({ params: { id: await readyRecording(s) } }) },
};

let stack: Stack;
const personIds = new Map<string, number>();

async function clientFor(caller: AuditCase['caller']): Promise<Client> {
  const c = createClient(stack.baseUrl);
  if (caller !== 'anonymous') expect((await c.signIn(ROLE_EMAIL[caller], DEMO_PASSWORD)).status).toBe(200);
  return c;
}

async function uploadFile(c: Client, file: { name: string; content: string }) {
  const boundary = `----keel-audit-${Math.random().toString(36).slice(2)}`;
  const body = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${file.name}"\r\nContent-Type: text/csv\r\n\r\n${file.content}\r\n--${boundary}--\r\n`;
  const token = await c.fetchCsrf();
  const res = await fetch(`${stack.baseUrl}/api/recordings`, {
    method: 'POST',
    headers: { 'Content-Type': `multipart/form-data; boundary=${boundary}`, 'x-csrf-token': token, Cookie: c.cookieHeader() },
    body,
  });
  return { status: res.status, body: await res.json() };
}

beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false, env: { KEEL_AUTO_SCAN: '0' } });
  ids = {
    area: await one(stack, `select id from areas where code = 'highmoor'`),
    site: await one(stack, `select id from sites where code = 'moorgate'`),
    otherSite: await one(stack, `select id from sites where code = 'saltreach-bay'`),
  };
  for (const [role, email] of Object.entries(ROLE_EMAIL)) personIds.set(role, await one(stack, 'select id from people where email = $1', [email]));
});
afterAll(async () => {
  await stack?.stop();
});

describe('the audit table', () => {
  it('has a case for every state-changing route of the catalogue, and only those', () => {
    const changing = ENDPOINT_KEYS.filter((k) => STATE_CHANGING_METHODS.includes(ENDPOINTS[k].method)).sort();
    expect(Object.keys(CASES).sort()).toEqual(changing);
  });
});

describe.each(Object.keys(CASES).map((k) => [k as StateChangingKey]))('%s', (key) => {
  it('writes its audit entry', async () => {
    const c = CASES[key];
    const e = ENDPOINTS[key];
    const client = await clientFor(c.caller);
    const req = await c.request(stack);
    const lastId = Number((await stack.pool.query('select coalesce(max(id), 0) as n from audit_log')).rows[0].n);
    const r = req.upload
      ? await uploadFile(client, req.upload)
      : await client.request(e.method, buildPath(e.path, req.params), req.body);
    expect(r.status, JSON.stringify(r.body)).toBe(e.status);

    const entries = (
      await stack.pool.query('select person_id, action, target, details, ip, at from audit_log where id > $1 and action = $2 order by id', [lastId, c.action])
    ).rows;
    expect(entries, `no "${c.action}" entry`).toHaveLength(1);
    const entry = entries[0];
    const expectedPerson =
      req.person !== undefined ? req.person : key === 'invitations.accept' ? (r.body as { person: { id: number } }).person.id : personIds.get(c.caller)!;
    expect(entry.person_id).toBe(expectedPerson);
    if (c.target) expect(entry.target).toMatch(c.target);
    else expect(entry.target).toBeNull();
    expect(entry.ip).toMatch(/^(::ffff:)?127\.0\.0\.1$/);
    expect(Math.abs(Date.now() - new Date(entry.at).getTime())).toBeLessThan(10 * 60_000); // stamped now (same host clock)
    if (key === 'recordings.upload') {
      expect(entry.details).toMatchObject({ fileName: 'audited.csv', mode: 'request', checksum: (r.body as { recording: { checksum: string } }).recording.checksum });
      expect(entry.target).toBe(`recording:${(r.body as { recording: { id: number } }).recording.id}`);
    }
    if (key === 'scans.create') expect(entry.details).toMatchObject({ recording: req.params!.id, windowSeconds: 1200, stepSeconds: 60 });
    if (key === 'alerts.acknowledge') expect(entry.details).toMatchObject({ note: 'Seen; following the procedure.' });
    if (key === 'people.update') expect(entry.details).toEqual({ from: 'planner', to: 'operator' });
  });
});
