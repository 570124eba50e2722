import { describe, expect, it } from 'vitest';
import { buildPath, emailSchema, linkTokenSchema, newPasswordSchema } from './common';
import { signInBodySchema } from './auth';
import { invitationCreateBodySchema } from './invitations';
import {
  areaUpdateBodySchema,
  channelCreateBodySchema,
  corridorCreateBodySchema,
  pmuCreateBodySchema,
  siteCreateBodySchema,
  trackCreateBodySchema,
} from './network';
import { outboxListQuerySchema } from './outbox';
import { personUpdateBodySchema } from './people';
import { errorBodySchema } from '../errors';

const paths = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) =>
  r.success ? [] : r.error!.issues.map((i) => i.path.join('.')).sort();

describe('shared API schemas', () => {
  it('normalise e-mail addresses (trim, lower case) and refuse non-addresses', () => {
    expect(emailSchema.parse('  Admin@Tarrow.Example ')).toBe('admin@tarrow.example');
    expect(emailSchema.safeParse('admin@').success).toBe(false);
    expect(emailSchema.safeParse('').success).toBe(false);
  });

  it('new passwords need 10..256 characters; sign-in accepts any non-empty password', () => {
    expect(newPasswordSchema.safeParse('123456789').success).toBe(false);
    expect(newPasswordSchema.safeParse('1234567890').success).toBe(true);
    expect(newPasswordSchema.safeParse('x'.repeat(257)).success).toBe(false);
    expect(signInBodySchema.safeParse({ email: 'a@tarrow.example', password: 'short' }).success).toBe(true);
    expect(paths(signInBodySchema.safeParse({ email: 'a@tarrow.example', password: '' }))).toEqual(['password']);
  });

  it('link tokens are base64url of a sensible length', () => {
    expect(linkTokenSchema.safeParse('A'.repeat(43)).success).toBe(true);
    expect(linkTokenSchema.safeParse('short').success).toBe(false);
    expect(linkTokenSchema.safeParse(`${'A'.repeat(42)}/`).success).toBe(false);
  });

  it('invitations and role changes take known roles only; a role change must change something', () => {
    expect(paths(invitationCreateBodySchema.safeParse({ email: 'x@tarrow.example', role: 'boss' }))).toEqual(['role']);
    expect(personUpdateBodySchema.safeParse({ role: 'planner' }).success).toBe(true);
    expect(personUpdateBodySchema.safeParse({}).success).toBe(false);
    expect(paths(personUpdateBodySchema.safeParse({ role: 'planner', admin: true }))).toEqual(['']);
  });

  it('network codes are kebab-case; sites stay on the 0..100 schematic grid', () => {
    const site = { code: 'new-site', name: 'New site', areaId: 1, kV: 230, x: 0, y: 100 };
    expect(siteCreateBodySchema.safeParse(site).success).toBe(true);
    expect(paths(siteCreateBodySchema.safeParse({ ...site, code: 'New Site', x: -1 }))).toEqual(['code', 'x']);
    expect(areaUpdateBodySchema.safeParse({}).success).toBe(false);
  });

  it('PMU reporting rates are those of IEEE C37.118.1 (standard)', () => {
    const pmu = { code: 'p', name: 'P', siteId: 1 };
    for (const rate of [10, 12, 15, 20, 25, 30, 50, 60]) expect(pmuCreateBodySchema.safeParse({ ...pmu, reportingRate: rate }).success).toBe(true);
    for (const rate of [1, 24, 100]) expect(pmuCreateBodySchema.safeParse({ ...pmu, reportingRate: rate }).success).toBe(false);
  });

  it('a channel unit must fit its kind', () => {
    const ch = { name: 'moorgate.angle', siteId: 1, kind: 'angle', unit: 'deg' };
    expect(channelCreateBodySchema.parse(ch)).toEqual({ ...ch, pmuId: null, description: '' });
    const r = channelCreateBodySchema.safeParse({ ...ch, unit: 'MW' });
    expect(paths(r)).toEqual(['unit']);
    expect(r.error!.issues[0].message).toBe("A angle channel's unit must be deg");
  });

  it('a corridor joins two different sites', () => {
    const c = { code: 'c', name: 'C', fromSiteId: 1, toSiteId: 2, kV: 500 };
    expect(corridorCreateBodySchema.safeParse(c).success).toBe(true);
    expect(paths(corridorCreateBodySchema.safeParse({ ...c, toSiteId: 1 }))).toEqual(['toSiteId']);
  });

  it('a mode track has a frequency band, ordered thresholds (default 3 / 5 %) and disjoint reference groups', () => {
    const t = { code: 'north-south', name: 'North–south', minHz: 0.2, maxHz: 0.45 };
    expect(trackCreateBodySchema.parse(t)).toMatchObject({ poorBelow: 3, lowBelow: 5, corridorId: null, reference: { groupA: [], groupB: [] } });
    expect(paths(trackCreateBodySchema.safeParse({ ...t, minHz: 0.5 }))).toEqual(['maxHz']);
    expect(paths(trackCreateBodySchema.safeParse({ ...t, poorBelow: 5, lowBelow: 5 }))).toEqual(['lowBelow']);
    expect(paths(trackCreateBodySchema.safeParse({ ...t, reference: { groupA: ['moorgate'], groupB: ['moorgate'] } }))).toEqual(['reference.groupB']);
  });

  it('outbox queries default to 100 and cap at 500', () => {
    expect(outboxListQuerySchema.parse({})).toEqual({ limit: 100 });
    expect(outboxListQuerySchema.parse({ limit: '20' })).toEqual({ limit: 20 });
    expect(outboxListQuerySchema.safeParse({ limit: '501' }).success).toBe(false);
  });

  it('buildPath fills Express parameters and refuses a missing one', () => {
    expect(buildPath('/api/people/:id', { id: 3 })).toBe('/api/people/3');
    expect(buildPath('/api/invitations/token/:token', { token: 'a/b' })).toBe('/api/invitations/token/a%2Fb');
    expect(() => buildPath('/api/people/:id')).toThrow('buildPath: missing parameter "id" for /api/people/:id');
  });

  it('the error body schema accepts the documented shape only', () => {
    expect(errorBodySchema.safeParse({ error: { code: 'VALIDATION', message: 'x', details: [{ path: 'a', message: 'b' }] } }).success).toBe(true);
    expect(errorBodySchema.safeParse({ error: { code: 'TEAPOT', message: 'x' } }).success).toBe(false);
  });
});
