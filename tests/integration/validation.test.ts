// Bad input to every route that takes input gets 400 { error: { code: 'VALIDATION', message,
// details } } naming each wrong field, and nothing is written (row counts of every table before
// and after). Foundation routes have hand-made bad requests; for any other route with a body
// schema, an empty body is sent and the answer must name exactly the fields the shared schema
// itself reports missing.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildPath } from '../../shared/api/common';
import { ENDPOINT_KEYS, ENDPOINTS, type EndpointDef, type EndpointKey } from '../../shared/api/endpoints';
import { zodDetails } from '../../server/errors';
import { createClient, type Client } from '../helpers/http';
import { DEMO_PASSWORD, ROLE_EMAIL, rowCounts } from '../helpers/fixtures';
import { startStack, type Stack } from '../helpers/stack';

interface BadCase {
  name: string;
  params?: Record<string, string | number>;
  query?: string;
  body?: unknown;
  /** Every field the answer must name (details[].path), in any order; no others. */
  fields: string[];
  /** Optional: a detail message that must appear for a field. */
  messages?: Record<string, string>;
}

const GOOD_TOKEN = 'A'.repeat(43);
const def = (k: EndpointKey): EndpointDef => ENDPOINTS[k];

const CASES: Partial<Record<EndpointKey, BadCase[]>> = {
  'auth.signIn': [{ name: 'e-mail not an address, empty password', body: { email: 'not-an-email', password: '' }, fields: ['email', 'password'] }],
  'people.update': [
    { name: 'id not a number, unknown role, disabled not boolean, extra field', params: { id: 'abc' }, body: { role: 'boss', disabled: 'yes', extra: 1 }, fields: ['id', 'role', 'disabled', 'extra'] },
  ],
  'invitations.create': [{ name: 'bad e-mail and role', body: { email: 'x', role: 'boss' }, fields: ['email', 'role'], messages: { email: 'Not a valid e-mail address' } }],
  'invitations.revoke': [{ name: 'id zero', params: { id: 0 }, fields: ['id'] }],
  'invitations.lookup': [{ name: 'malformed token', params: { token: 'short' }, fields: ['token'] }],
  'invitations.accept': [
    { name: 'bad token, empty name, short password', body: { token: 'bad!', displayName: ' ', password: 'short' }, fields: ['token', 'displayName', 'password'], messages: { password: 'Password must be at least 10 characters' } },
    { name: 'everything missing', body: {}, fields: ['token', 'displayName', 'password'], messages: { token: 'Required' } },
  ],
  'passwordReset.request': [{ name: 'not an address', body: { email: 'nope' }, fields: ['email'] }],
  'passwordReset.complete': [{ name: 'empty token, short password', body: { token: '', password: 'x' }, fields: ['token', 'password'] }],
  'outbox.list': [{ name: 'limit 0 and an unknown parameter', query: 'limit=0&bogus=1', fields: ['limit', 'bogus'] }],
  'outbox.get': [{ name: 'id not a number', params: { id: 'x' }, fields: ['id'] }],
  'areas.create': [{ name: 'code with spaces, empty name', body: { code: 'Bad Code', name: '' }, fields: ['code', 'name'] }],
  'areas.update': [
    { name: 'upper-case code', params: { id: 1 }, body: { code: 'UPPER' }, fields: ['code'] },
    { name: 'nothing to change', params: { id: 1 }, body: {}, fields: [''], messages: { '': 'Give at least one field to change' } },
  ],
  'areas.remove': [{ name: 'negative id', params: { id: -1 }, fields: ['id'] }],
  'sites.create': [
    { name: 'areaId text, negative kV, x off the grid', body: { code: 'ok-code', name: 'S', areaId: 'one', kV: -5, x: 101, y: 0 }, fields: ['areaId', 'kV', 'x'] },
    { name: 'unknown area', body: { code: 'ok-code', name: 'S', areaId: 999999, kV: 230, x: 1, y: 1 }, fields: ['areaId'], messages: { areaId: 'No area with id 999999' } },
  ],
  'sites.update': [{ name: 'y above 100', params: { id: 1 }, body: { y: 100.5 }, fields: ['y'] }],
  'sites.remove': [{ name: 'id text', params: { id: 'abc' }, fields: ['id'] }],
  'pmus.create': [{ name: 'non-standard reporting rate', body: { code: 'p', name: 'P', siteId: 1, reportingRate: 31 }, fields: ['reportingRate'] }],
  'pmus.update': [{ name: 'reporting rate 7', params: { id: 1 }, body: { reportingRate: 7 }, fields: ['reportingRate'] }],
  'pmus.remove': [{ name: 'id 1.5', params: { id: '1.5' }, fields: ['id'] }],
  'channels.create': [
    { name: 'upper-case name, Hz for an angle', body: { name: 'Bad Name', siteId: 1, kind: 'angle', unit: 'Hz' }, fields: ['name', 'unit'] },
  ],
  'channels.update': [{ name: 'unknown kind', params: { id: 1 }, body: { kind: 'colour' }, fields: ['kind'] }],
  'channels.remove': [{ name: 'id zero', params: { id: 0 }, fields: ['id'] }],
  'corridors.create': [{ name: 'both ends the same site', body: { code: 'c', name: 'C', fromSiteId: 1, toSiteId: 1, kV: 345 }, fields: ['toSiteId'] }],
  'corridors.update': [
    { name: 'kV zero', params: { id: 1 }, body: { kV: 0 }, fields: ['kV'] },
    { name: 'flow channel that is an angle', params: { id: 1 }, body: { flowChannelId: 'ANGLE' as unknown as number }, fields: ['flowChannelId'] },
  ],
  'corridors.remove': [{ name: 'id text', params: { id: 'x' }, fields: ['id'] }],
  'tracks.create': [
    { name: 'band upside down, thresholds upside down', body: { code: 't', name: 'T', minHz: 0.5, maxHz: 0.4, poorBelow: 5, lowBelow: 3 }, fields: ['maxHz', 'lowBelow'] },
  ],
  'tracks.update': [
    { name: 'minHz above the stored maxHz', params: { id: 1 }, body: { minHz: 0.5 }, fields: ['maxHz'], messages: { maxHz: 'Must be above the lowest frequency (minHz)' } },
    { name: 'unknown site in the reference shape', params: { id: 1 }, body: { reference: { groupA: ['nowhere'], groupB: [] } }, fields: ['reference.groupA.0'], messages: { 'reference.groupA.0': 'No site with code "nowhere"' } },
    { name: 'unknown corridor', params: { id: 1 }, body: { corridorId: 999999 }, fields: ['corridorId'] },
  ],
  'tracks.remove': [{ name: 'id text', params: { id: 'x' }, fields: ['id'] }],
};

let stack: Stack;
let admin: Client;
beforeAll(async () => {
  stack = await startStack({ worker: false, mailSink: false });
  admin = createClient(stack.baseUrl);
  expect((await admin.signIn(ROLE_EMAIL.admin, DEMO_PASSWORD)).status).toBe(200);
  // The corridor case needs a real angle channel id in place of the marker.
  const angle = await stack.pool.query(`select id from channels where name = 'moorgate.angle'`);
  for (const c of CASES['corridors.update']!) {
    if ((c.body as { flowChannelId?: unknown }).flowChannelId === 'ANGLE') (c.body as { flowChannelId: number }).flowChannelId = angle.rows[0].id;
  }
});
afterAll(async () => {
  await stack?.stop();
});

async function expectRefused(key: EndpointKey, c: BadCase) {
  const e = ENDPOINTS[key];
  const before = await rowCounts(stack.pool);
  const path = buildPath(e.path, c.params) + (c.query ? `?${c.query}` : '');
  const r = await admin.request(e.method, path, c.body);
  expect(r.status, JSON.stringify(r.body)).toBe(400);
  expect(r.body.error.code).toBe('VALIDATION');
  expect(typeof r.body.error.message).toBe('string');
  const details = r.body.error.details as { path: string; message: string }[];
  expect(Array.isArray(details)).toBe(true);
  expect([...new Set(details.map((d) => d.path))].sort()).toEqual([...c.fields].sort());
  for (const d of details) expect(d.message.length).toBeGreaterThan(0);
  for (const [field, message] of Object.entries(c.messages ?? {})) {
    expect(details.filter((d) => d.path === field).map((d) => d.message)).toContain(message);
  }
  expect(await rowCounts(stack.pool)).toEqual(before);
}

describe('foundation routes refuse bad input', () => {
  const entries = Object.entries(CASES).flatMap(([key, cases]) => cases!.map((c) => [key as EndpointKey, c] as const));
  it.each(entries.map(([k, c]) => [k, c.name, c] as const))('%s: %s', async (key, _name, c) => {
    await expectRefused(key, c);
  });
});

describe('every other route with a request body refuses an empty one, naming the missing fields', () => {
  const others = ENDPOINT_KEYS.filter((k) => !(k in CASES) && def(k).body);
  const withRequired = others.filter((k) => !def(k).body!.safeParse({}).success);
  it.each(withRequired.map((k) => [k] as const))('%s', async (key) => {
    const e = def(key);
    const expectedFields = zodDetails(e.body!.safeParse({}).error!, {}).map((d) => d.path);
    // Path parameters: a valid-looking id, so only the body is wrong.
    const params = Object.fromEntries([...e.path.matchAll(/:([A-Za-z_]+)/g)].map(([, n]) => [n, n === 'token' ? GOOD_TOKEN : n === 'code' ? 'north-south' : 1]));
    let fields = expectedFields;
    if (e.params && !e.params.safeParse(params).success) fields = [...fields, ...zodDetails(e.params.safeParse(params).error!, params).map((d) => d.path)];
    await expectRefused(key, { name: 'empty body', params, body: {}, fields: [...new Set(fields)] });
  });

  it('the foundation cases cover every foundation route that takes input', () => {
    const foundation = ['auth.', 'people.', 'invitations.', 'passwordReset.', 'outbox.', 'areas.', 'sites.', 'pmus.', 'channels.', 'corridors.', 'tracks.'];
    const takesInput = ENDPOINT_KEYS.filter((k) => foundation.some((p) => k.startsWith(p)) && (def(k).params || def(k).query || def(k).body));
    expect(takesInput.filter((k) => !(k in CASES))).toEqual([]);
  });
});
