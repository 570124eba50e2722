// Idempotent seed: the invented Tarrow network (fixtures/tarrow-network.ts) and one demo person
// per role. Rows are inserted only when missing (matched by code / e-mail), so a second run
// changes nothing and edits made through the app survive a re-seed.
import { inArray } from 'drizzle-orm';
import {
  TARROW_AREAS,
  TARROW_CHANNELS,
  TARROW_CORRIDORS,
  TARROW_REPORTING_RATE,
  TARROW_SITES,
  TARROW_TRACKS,
} from '../fixtures/tarrow-network';
import { hashPassword } from '../server/auth/passwords';
import type { Db, DbOrTx } from './client';
import { areas, channels, corridors, modeTracks, people, pmus, sites } from './schema';

/**
 * Demo accounts. The password is published on purpose (README, start-up banner): it exists only
 * in the demo database. Change or disable these accounts in any real deployment.
 */
export const DEMO_PASSWORD = 'tarrow-demo-2026';
export const DEMO_PEOPLE = [
  { email: 'admin@tarrow.example', displayName: 'Demo Administrator', role: 'admin' },
  { email: 'engineer@tarrow.example', displayName: 'Demo Engineer', role: 'engineer' },
  { email: 'operator@tarrow.example', displayName: 'Demo Operator', role: 'operator' },
  { email: 'planner@tarrow.example', displayName: 'Demo Planner', role: 'planner' },
] as const satisfies readonly { email: string; displayName: string; role: (typeof people.$inferSelect)['role'] }[];

export interface SeedCounts {
  areas: number;
  sites: number;
  pmus: number;
  channels: number;
  corridors: number;
  tracks: number;
  people: number;
}

/** One PMU per Tarrow site; its code is derived from the site's. */
export const pmuCodeOf = (siteCode: string) => `${siteCode}-pmu`;

/** Only the rows whose key is not stored yet (reruns then do not even advance an id sequence). */
function missingOnly<T>(rows: T[], existing: Map<string, number>, key: (r: T) => string): T[] {
  return rows.filter((r) => !existing.has(key(r)));
}

/** Insert that tolerates an empty list (drizzle refuses `values([])`). */
async function insertSome<T>(rows: T[], insert: (rows: T[]) => Promise<{ id: number }[]>): Promise<number> {
  return rows.length === 0 ? 0 : (await insert(rows)).length;
}

async function idsByCode(rows: Promise<{ id: number; code: string }[]>): Promise<Map<string, number>> {
  return new Map((await rows).map((r) => [r.code, r.id]));
}

function need(map: Map<string, number>, key: string, what: string): number {
  const id = map.get(key);
  if (id === undefined) throw new Error(`Seed: ${what} "${key}" is missing`);
  return id;
}

export async function seedNetwork(db: DbOrTx): Promise<Omit<SeedCounts, 'people'>> {
  const codes = idsByCode;

  let areaId = await codes(db.select({ id: areas.id, code: areas.code }).from(areas));
  const nAreas = await insertSome(
    missingOnly(TARROW_AREAS, areaId, (a) => a.code).map((a) => ({ code: a.code, name: a.name, description: a.description })),
    (rows) => db.insert(areas).values(rows).onConflictDoNothing().returning({ id: areas.id }),
  );
  areaId = await codes(db.select({ id: areas.id, code: areas.code }).from(areas));

  let siteId = await codes(db.select({ id: sites.id, code: sites.code }).from(sites));
  const nSites = await insertSome(
    missingOnly(TARROW_SITES, siteId, (s) => s.code).map((s) => ({
      code: s.code,
      name: s.name,
      areaId: need(areaId, s.area, 'area'),
      kV: s.kV,
      x: s.x,
      y: s.y,
    })),
    (rows) => db.insert(sites).values(rows).onConflictDoNothing().returning({ id: sites.id }),
  );
  siteId = await codes(db.select({ id: sites.id, code: sites.code }).from(sites));

  let pmuId = await codes(db.select({ id: pmus.id, code: pmus.code }).from(pmus));
  const nPmus = await insertSome(
    missingOnly(TARROW_SITES, pmuId, (s) => pmuCodeOf(s.code)).map((s) => ({
      code: pmuCodeOf(s.code),
      name: `${s.name} PMU`,
      siteId: need(siteId, s.code, 'site'),
      reportingRate: TARROW_REPORTING_RATE,
      description: `Phasor measurement unit at ${s.name} (${s.kV} kV)`,
    })),
    (rows) => db.insert(pmus).values(rows).onConflictDoNothing().returning({ id: pmus.id }),
  );
  pmuId = await codes(db.select({ id: pmus.id, code: pmus.code }).from(pmus));

  const channelIds = () =>
    codes(db.select({ id: channels.id, code: channels.name }).from(channels));
  let channelId = await channelIds();
  const nChannels = await insertSome(
    missingOnly(TARROW_CHANNELS, channelId, (c) => c.name).map((c) => ({
      name: c.name,
      siteId: need(siteId, c.site, 'site'),
      pmuId: need(pmuId, pmuCodeOf(c.site), 'PMU'),
      kind: c.kind,
      unit: c.unit,
      description: c.description,
    })),
    (rows) => db.insert(channels).values(rows).onConflictDoNothing().returning({ id: channels.id }),
  );
  channelId = await channelIds();

  let corridorId = await codes(db.select({ id: corridors.id, code: corridors.code }).from(corridors));
  const nCorridors = await insertSome(
    missingOnly(TARROW_CORRIDORS, corridorId, (c) => c.code).map((c) => ({
      code: c.code,
      name: c.name,
      fromSiteId: need(siteId, c.fromSite, 'site'),
      toSiteId: need(siteId, c.toSite, 'site'),
      kV: c.kV,
      flowChannelId: need(channelId, c.flowChannel, 'channel'),
      fromAngleChannelId: need(channelId, c.fromAngleChannel, 'channel'),
      toAngleChannelId: need(channelId, c.toAngleChannel, 'channel'),
    })),
    (rows) => db.insert(corridors).values(rows).onConflictDoNothing().returning({ id: corridors.id }),
  );
  corridorId = await codes(db.select({ id: corridors.id, code: corridors.code }).from(corridors));

  const trackId = await codes(db.select({ id: modeTracks.id, code: modeTracks.code }).from(modeTracks));
  const nTracks = await insertSome(
    missingOnly(TARROW_TRACKS, trackId, (t) => t.code).map((t) => ({
      code: t.code,
      name: t.name,
      description: t.description,
      minHz: t.minHz,
      maxHz: t.maxHz,
      poorBelow: t.poorBelow,
      lowBelow: t.lowBelow,
      corridorId: need(corridorId, t.corridor, 'corridor'),
      reference: { groupA: [...t.reference.groupA], groupB: [...t.reference.groupB] },
    })),
    (rows) => db.insert(modeTracks).values(rows).onConflictDoNothing().returning({ id: modeTracks.id }),
  );

  return { areas: nAreas, sites: nSites, pmus: nPmus, channels: nChannels, corridors: nCorridors, tracks: nTracks };
}

export async function seedDemoPeople(db: DbOrTx, params: { password?: string } = {}): Promise<number> {
  const emails = DEMO_PEOPLE.map((p) => p.email);
  const existing = new Set(
    (await db.select({ email: people.email }).from(people).where(inArray(people.email, emails))).map((r) => r.email),
  );
  const missing = DEMO_PEOPLE.filter((p) => !existing.has(p.email));
  if (missing.length === 0) return 0;
  // Hash only for the missing ones: a fresh salt each time would otherwise make reruns differ.
  const values = await Promise.all(
    missing.map(async (p) => ({ ...p, passwordHash: await hashPassword(params.password ?? DEMO_PASSWORD) })),
  );
  return insertSome(values, (rows) => db.insert(people).values(rows).onConflictDoNothing().returning({ id: people.id }));
}

export async function seedAll(db: Db): Promise<SeedCounts> {
  return db.transaction(async (tx) => {
    const network = await seedNetwork(tx);
    const added = await seedDemoPeople(tx);
    return { ...network, people: added };
  });
}
