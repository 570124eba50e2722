// The network model: one set of (db, params) functions per table, what still refers to a row
// (so a delete can be refused with a clear message), and each track's latest estimate.
import { asc, count, desc, eq, inArray, isNotNull, or, type SQL } from 'drizzle-orm';
import type { PgColumn, PgTable } from 'drizzle-orm/pg-core';
import type { DbOrTx } from '../client';
import {
  alerts,
  areas,
  channels,
  corridors,
  modeEstimates,
  modeShapes,
  modeTracks,
  pmus,
  recordingChannels,
  sampleChunks,
  sites,
  transferStudies,
} from '../schema';

export type AreaRow = typeof areas.$inferSelect;
export type SiteRow = typeof sites.$inferSelect;
export type PmuRow = typeof pmus.$inferSelect;
export type ChannelRow = typeof channels.$inferSelect;
export type CorridorRow = typeof corridors.$inferSelect;
export type TrackRow = typeof modeTracks.$inferSelect;
export type EstimateRow = typeof modeEstimates.$inferSelect;

type TableWithId = PgTable & { id: PgColumn };

/** list / get / insert / update / remove for a network table, all as (db, params). */
function crud<T extends TableWithId>(table: T) {
  type Row = T['$inferSelect'];
  type Insert = T['$inferInsert'];
  const t = table as unknown as typeof areas; // drizzle's builders need a concrete table type
  return {
    list: async (db: DbOrTx): Promise<Row[]> => (await db.select().from(t).orderBy(asc(t.id))) as Row[],
    get: async (db: DbOrTx, params: { id: number }): Promise<Row | undefined> =>
      ((await db.select().from(t).where(eq(t.id, params.id))) as Row[])[0],
    insert: async (db: DbOrTx, params: { values: Insert }): Promise<Row> =>
      ((await db.insert(t).values(params.values as never).returning()) as Row[])[0],
    update: async (db: DbOrTx, params: { id: number; values: Partial<Insert> }): Promise<Row | undefined> =>
      ((await db.update(t).set(params.values as never).where(eq(t.id, params.id)).returning()) as Row[])[0],
    remove: async (db: DbOrTx, params: { id: number }): Promise<boolean> =>
      (await db.delete(t).where(eq(t.id, params.id)).returning({ id: t.id })).length > 0,
  };
}

export const areaQueries = crud(areas);
export const siteQueries = crud(sites);
export const pmuQueries = crud(pmus);
export const channelQueries = crud(channels);
export const corridorQueries = crud(corridors);
export const trackQueries = crud(modeTracks);

export type NetworkKind = 'area' | 'site' | 'pmu' | 'channel' | 'corridor' | 'track';

/** One kind of record that still refers to a row, with how many there are. */
export interface Reference {
  what: string;
  count: number;
}

async function countWhere(db: DbOrTx, table: PgTable, where: SQL | undefined): Promise<number> {
  const [row] = await db.select({ n: count() }).from(table).where(where);
  return row.n;
}

/**
 * What still refers to a network row. Deleting it is refused while this is non-empty, so
 * nothing already stored (estimates, alerts, samples) is lost by an edit of the model.
 */
export async function referencesTo(db: DbOrTx, params: { kind: NetworkKind; id: number }): Promise<Reference[]> {
  const { id } = params;
  const checks: [string, Promise<number>][] = [];
  switch (params.kind) {
    case 'area':
      checks.push(['site', countWhere(db, sites, eq(sites.areaId, id))]);
      break;
    case 'site':
      checks.push(['PMU', countWhere(db, pmus, eq(pmus.siteId, id))]);
      checks.push(['channel', countWhere(db, channels, eq(channels.siteId, id))]);
      checks.push(['corridor', countWhere(db, corridors, or(eq(corridors.fromSiteId, id), eq(corridors.toSiteId, id)))]);
      break;
    case 'pmu':
      checks.push(['channel', countWhere(db, channels, eq(channels.pmuId, id))]);
      break;
    case 'channel':
      checks.push([
        'corridor',
        countWhere(
          db,
          corridors,
          or(eq(corridors.flowChannelId, id), eq(corridors.fromAngleChannelId, id), eq(corridors.toAngleChannelId, id)),
        ),
      ]);
      checks.push(['recording', countWhere(db, recordingChannels, eq(recordingChannels.channelId, id))]);
      checks.push(['sample chunk', countWhere(db, sampleChunks, eq(sampleChunks.channelId, id))]);
      checks.push(['mode shape', countWhere(db, modeShapes, eq(modeShapes.channelId, id))]);
      break;
    case 'corridor':
      checks.push(['mode track', countWhere(db, modeTracks, eq(modeTracks.corridorId, id))]);
      checks.push(['transfer study', countWhere(db, transferStudies, eq(transferStudies.corridorId, id))]);
      break;
    case 'track':
      checks.push(['mode estimate', countWhere(db, modeEstimates, eq(modeEstimates.trackId, id))]);
      checks.push(['alert', countWhere(db, alerts, eq(alerts.trackId, id))]);
      checks.push(['transfer study', countWhere(db, transferStudies, eq(transferStudies.trackId, id))]);
      break;
  }
  const counts = await Promise.all(checks.map(([, p]) => p));
  return checks.map(([what], i) => ({ what, count: counts[i] })).filter((r) => r.count > 0);
}

/** The newest estimate of each track (by estimate time, then id). */
export async function latestEstimatesByTrack(db: DbOrTx, params: { trackIds?: number[] } = {}): Promise<Map<number, EstimateRow>> {
  const where = params.trackIds ? inArray(modeEstimates.trackId, params.trackIds) : isNotNull(modeEstimates.trackId);
  if (params.trackIds && params.trackIds.length === 0) return new Map();
  const rows = await db
    .selectDistinctOn([modeEstimates.trackId])
    .from(modeEstimates)
    .where(where)
    .orderBy(modeEstimates.trackId, desc(modeEstimates.at), desc(modeEstimates.id));
  return new Map(rows.map((r) => [r.trackId as number, r]));
}

/** Sites whose code is in `codes` (to check a track's reference groups). */
export async function sitesByCodes(db: DbOrTx, params: { codes: string[] }): Promise<SiteRow[]> {
  if (params.codes.length === 0) return [];
  return db.select().from(sites).where(inArray(sites.code, params.codes));
}
