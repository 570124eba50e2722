// Every route of the API × every role (and anonymous) answers as the role table of
// shared/roles.ts (DESIGN.md §5.3) says: allowed → the route's success status, a role without
// the permission → 403 FORBIDDEN, anonymous on a non-public route → 401 UNAUTHENTICATED.
// The table is the endpoint catalogue the server mounts (shared/api/endpoints.ts), so every new
// route is enumerated here with its role rule. Routes with a sample request below are checked for
// their exact success status; the others for passing (allowed) or stopping (401/403) at the gate.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ENDPOINT_KEYS, ENDPOINTS, type EndpointKey } from '../../shared/api/endpoints';
import { buildPath } from '../../shared/api/common';
import { canAccess, PERMISSION_NAMES, ROLES, type Role } from '../../shared/roles';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, insertInvitation, insertPasswordReset, insertPerson, ROLE_EMAIL, unique } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';
import { ANALYSIS_ROLE_SAMPLES } from './analysis-role-samples';

interface Sample {
  params?: Record<string, string | number>;
  query?: string;
  body?: unknown;
  /** Use a client of its own (signing in or out changes the shared one's session). */
  ownClient?: boolean;
}
type Caller = Role | 'anonymous';
type SampleFn = (s: Stack, caller: Caller) => Promise<Sample>;

// Ids of the seeded Tarrow network, looked up once.
let ids: { area: number; site: number; otherSite: number; pmu: number; flowChannel: number; corridor: number } = null as never;

async function freshArea(s: Stack): Promise<number> {
  const r = await s.pool.query(`insert into areas (code, name) values ($1, 'Scratch') returning id`, [unique('scratch')]);
  return r.rows[0].id as number;
}
async function freshSite(s: Stack): Promise<number> {
  const r = await s.pool.query(`insert into sites (code, name, area_id, kv, x, y) values ($1, 'Scratch', $2, 230, 1, 1) returning id`, [
    unique('scratch'),
    ids.area,
  ]);
  return r.rows[0].id as number;
}
async function freshPmu(s: Stack): Promise<number> {
  const r = await s.pool.query(`insert into pmus (code, name, site_id, reporting_rate) values ($1, 'Scratch', $2, 30) returning id`, [
    unique('scratch'),
    ids.site,
  ]);
  return r.rows[0].id as number;
}
async function freshChannel(s: Stack): Promise<number> {
  const r = await s.pool.query(`insert into channels (name, site_id, kind, unit) values ($1, $2, 'frequency', 'Hz') returning id`, [
    unique('scratch.freq'),
    ids.site,
  ]);
  return r.rows[0].id as number;
}
async function freshCorridor(s: Stack): Promise<number> {
  const r = await s.pool.query(`insert into corridors (code, name, from_site_id, to_site_id, kv) values ($1, 'Scratch', $2, $3, 345) returning id`, [
    unique('scratch'),
    ids.site,
    ids.otherSite,
  ]);
  return r.rows[0].id as number;
}
async function freshTrack(s: Stack): Promise<number> {
  const r = await s.pool.query(`insert into mode_tracks (code, name, min_hz, max_hz) values ($1, 'Scratch', 2, 3) returning id`, [unique('scratch')]);
  return r.rows[0].id as number;
}

/** Requests that succeed for an allowed caller, per endpoint (fresh rows where the call changes state). */
const SAMPLES: Partial<Record<EndpointKey, SampleFn>> = {
  ...ANALYSIS_ROLE_SAMPLES,
  'health.get': async () => ({}),
  'auth.csrf': async () => ({}),
  'auth.signIn': async (_s, caller) => ({
    body: { email: ROLE_EMAIL[caller === 'anonymous' ? 'planner' : caller], password: DEMO_PASSWORD },
    ownClient: true,
  }),
  'auth.signOut': async () => ({ body: {}, ownClient: true }),
  'auth.me': async () => ({}),
  'people.list': async () => ({}),
  'people.update': async (s) => ({ params: { id: await insertPerson(s.pool) }, body: { role: 'operator' } }),
  'invitations.list': async () => ({}),
  'invitations.create': async () => ({ body: { email: `${unique('new')}@tarrow.example`, role: 'operator' } }),
  'invitations.revoke': async (s) => ({ params: { id: (await insertInvitation(s.pool)).id } }),
  'invitations.lookup': async (s) => ({ params: { token: (await insertInvitation(s.pool)).token } }),
  'invitations.accept': async (s) => ({
    body: { token: (await insertInvitation(s.pool)).token, displayName: 'New Colleague', password: 'a-long-new-password' },
  }),
  'passwordReset.request': async () => ({ body: { email: `${unique('whoever')}@tarrow.example` } }),
  'passwordReset.complete': async (s) => ({ body: { token: (await insertPasswordReset(s.pool)).token, password: 'another-new-password' } }),
  'outbox.list': async () => ({ query: 'limit=5' }),
  'outbox.get': async (s) => {
    const r = await s.pool.query(`insert into outbox_messages ("from", "to", subject, text) values ('a@x.example', 'b@x.example', 'Hi', 'Hello') returning id`);
    return { params: { id: r.rows[0].id as number } };
  },
  'network.get': async () => ({}),
  'areas.list': async () => ({}),
  'areas.create': async () => ({ body: { code: unique('area'), name: 'New area' } }),
  'areas.update': async (s) => ({ params: { id: await freshArea(s) }, body: { name: 'Renamed' } }),
  'areas.remove': async (s) => ({ params: { id: await freshArea(s) } }),
  'sites.list': async () => ({}),
  'sites.create': async () => ({ body: { code: unique('site'), name: 'New site', areaId: ids.area, kV: 230, x: 10, y: 20 } }),
  'sites.update': async (s) => ({ params: { id: await freshSite(s) }, body: { kV: 345 } }),
  'sites.remove': async (s) => ({ params: { id: await freshSite(s) } }),
  'pmus.list': async () => ({}),
  'pmus.create': async () => ({ body: { code: unique('pmu'), name: 'New PMU', siteId: ids.site, reportingRate: 30 } }),
  'pmus.update': async (s) => ({ params: { id: await freshPmu(s) }, body: { reportingRate: 60 } }),
  'pmus.remove': async (s) => ({ params: { id: await freshPmu(s) } }),
  'channels.list': async () => ({}),
  'channels.create': async () => ({ body: { name: unique('new.freq'), siteId: ids.site, kind: 'frequency', unit: 'Hz' } }),
  'channels.update': async (s) => ({ params: { id: await freshChannel(s) }, body: { description: 'Changed' } }),
  'channels.remove': async (s) => ({ params: { id: await freshChannel(s) } }),
  'corridors.list': async () => ({}),
  'corridors.create': async () => ({
    body: { code: unique('corridor'), name: 'New corridor', fromSiteId: ids.site, toSiteId: ids.otherSite, kV: 345 },
  }),
  'corridors.update': async (s) => ({ params: { id: await freshCorridor(s) }, body: { kV: 500 } }),
  'corridors.remove': async (s) => ({ params: { id: await freshCorridor(s) } }),
  'tracks.list': async () => ({}),
  'tracks.create': async () => ({ body: { code: unique('track'), name: 'New track', minHz: 1.7, maxHz: 1.9 } }),
  'tracks.update': async (s) => ({ params: { id: await freshTrack(s) }, body: { lowBelow: 6 } }),
  'tracks.remove': async (s) => ({ params: { id: await freshTrack(s) } }),
};

const CALLERS: Caller[] = ['anonymous', ...ROLES];

function expected(key: EndpointKey, caller: Caller): number {
  const e = ENDPOINTS[key];
  const role = caller === 'anonymous' ? null : caller;
  if (canAccess(role, e.access)) return e.status;
  return role === null ? 401 : 403;
}

let stack: Stack;
const clients = new Map<Caller, Client>();

async function clientFor(caller: Caller, own: boolean): Promise<Client> {
  if (!own && clients.has(caller)) return clients.get(caller)!;
  const c = createClient(stack.baseUrl);
  if (caller !== 'anonymous') {
    const r = await c.signIn(ROLE_EMAIL[caller], DEMO_PASSWORD);
    expect(r.status, `sign-in as ${caller}`).toBe(200);
  }
  if (!own) clients.set(caller, c);
  return c;
}

beforeAll(async () => {
  stack = await startStack({ worker: true, mailSink: true });
  const one = async (sql: string) => (await stack.pool.query(sql)).rows[0].id as number;
  ids = {
    area: await one(`select id from areas where code = 'highmoor'`),
    site: await one(`select id from sites where code = 'moorgate'`),
    otherSite: await one(`select id from sites where code = 'saltreach-bay'`),
    pmu: await one(`select id from pmus where code = 'moorgate-pmu'`),
    flowChannel: await one(`select id from channels where name = 'moorgate.mw'`),
    corridor: await one(`select id from corridors where code = 'highmoor-saltreach'`),
  };
});
afterAll(async () => {
  await stack?.stop();
});

describe('the route registry', () => {
  it('every endpoint has an access rule from the role table', () => {
    const rules = new Set<string>(['public', 'signedIn', ...PERMISSION_NAMES]);
    for (const key of ENDPOINT_KEYS) expect(rules.has(ENDPOINTS[key].access), `${key} access "${ENDPOINTS[key].access}"`).toBe(true);
  });

  it('paths and methods are unique', () => {
    const seen = ENDPOINT_KEYS.map((k) => `${ENDPOINTS[k].method} ${ENDPOINTS[k].path}`);
    expect(new Set(seen).size).toBe(seen.length);
  });

  it('every sample request here belongs to a registered endpoint', () => {
    const keys = new Set<string>(ENDPOINT_KEYS);
    expect(Object.keys(SAMPLES).filter((k) => !keys.has(k))).toEqual([]);
  });
});

/** Placeholder parameters for routes without a sample: the access check comes before validation. */
function placeholderPath(path: string): string {
  return path.replace(/:([A-Za-z_]+)/g, '999999');
}

/** Status only (streams such as Server-Sent Events never end by themselves). */
async function statusOf(client: Client, method: string, path: string, body?: unknown): Promise<number> {
  const headers: Record<string, string> = { Cookie: client.cookieHeader(), 'Content-Type': 'application/json' };
  if (!['GET', 'HEAD'].includes(method)) headers['x-csrf-token'] = await client.fetchCsrf();
  headers.Cookie = client.cookieHeader();
  const res = await fetch(`${client.baseUrl}${path}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
  await res.body?.cancel();
  return res.status;
}

describe.each(ENDPOINT_KEYS.map((k) => [k] as const))('%s', (key) => {
  const e = ENDPOINTS[key];
  const sampleFn = (SAMPLES as Partial<Record<EndpointKey, SampleFn>>)[key];
  it.each(CALLERS.map((c) => [c, expected(key, c)] as const))(`${e.method} ${e.path} as %s → %i`, async (caller, status) => {
    if (!sampleFn) {
      // A route this file has no sample for: the access rule must still hold (401 / 403), and an
      // allowed caller must get past it (whatever the handler then says about the placeholders).
      const client = await clientFor(caller, false);
      const got = await statusOf(client, e.method, placeholderPath(e.path), e.method === 'GET' ? undefined : {});
      if (status === 401 || status === 403) expect(got).toBe(status);
      else expect([401, 403]).not.toContain(got);
      return;
    }
    const sample = await sampleFn(stack, caller);
    const client = await clientFor(caller, sample.ownClient ?? false);
    const path = buildPath(e.path, sample.params) + (sample.query ? `?${sample.query}` : '');
    const r = await client.request(e.method, path, sample.body);
    expect(r.status, JSON.stringify(r.body)).toBe(status);
    if (status === 401) expect(r.body.error.code).toBe('UNAUTHENTICATED');
    if (status === 403) expect(r.body.error.code).toBe('FORBIDDEN');
    const json = (r.headers.get('content-type') ?? '').includes('application/json');
    if (status < 300 && json) expect(e.response.safeParse(r.body).success, JSON.stringify(r.body)).toBe(true);
  });
});
