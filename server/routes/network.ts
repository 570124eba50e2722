// The network model: everyone signed in reads it; admins and engineers edit it. Every edit is
// checked as a whole (an update is merged into the stored row and validated like a create),
// references must exist and make sense, deleting what is still referred to is refused with 409,
// and each change is written to the audit log in the same transaction.
import { z } from 'zod';
import { recordAudit } from '../../db/queries/audit';
import type { DbOrTx } from '../../db/client';
import {
  areaQueries,
  channelQueries,
  corridorQueries,
  latestEstimatesByTrack,
  pmuQueries,
  referencesTo,
  siteQueries,
  sitesByCodes,
  trackQueries,
  type NetworkKind,
  type TrackRow,
} from '../../db/queries/network';
import type { EndpointKey } from '../../shared/api/endpoints';
import {
  areaCreateBodySchema,
  channelCreateBodySchema,
  corridorCreateBodySchema,
  pmuCreateBodySchema,
  siteCreateBodySchema,
  trackCreateBodySchema,
} from '../../shared/api/network';
import type { ErrorDetail } from '../../shared/errors';
import type { Deps } from '../deps';
import { ConflictError, NotFoundError, pgErrorOf, validationError, validationErrorFromZod } from '../errors';
import { toArea, toChannel, toCorridor, toPmu, toSite, toTrack } from '../dto';
import { route, type RouteDef } from './registry';
import type { PersonRow } from '../../db/queries/people';

type Row = { id: number } & Record<string, unknown>;
type Values = Record<string, unknown>;

interface Crud {
  list(db: DbOrTx): Promise<Row[]>;
  get(db: DbOrTx, p: { id: number }): Promise<Row | undefined>;
  insert(db: DbOrTx, p: { values: Values }): Promise<Row>;
  update(db: DbOrTx, p: { id: number; values: Values }): Promise<Row | undefined>;
  remove(db: DbOrTx, p: { id: number }): Promise<boolean>;
}

interface Resource {
  kind: NetworkKind;
  /** URL segment and endpoint-key prefix, e.g. "sites". */
  plural: 'areas' | 'sites' | 'pmus' | 'channels' | 'corridors' | 'tracks';
  /** Key of a single item in responses, e.g. "site". */
  one: string;
  label: string;
  crud: Crud;
  createSchema: z.ZodType;
  /** The stored row in create-body form (to merge a PATCH into). */
  editable(row: Row): Values;
  /** Which field holds the unique key (409 messages point at it). */
  keyField: 'code' | 'name';
  checkRefs(db: DbOrTx, v: Values, id: number | null): Promise<ErrorDetail[]>;
  toDtos(db: DbOrTx, rows: Row[]): Promise<unknown[]>;
}

const pick = (row: Row, keys: string[]): Values => Object.fromEntries(keys.map((k) => [k, row[k]]));

async function mustExist(db: DbOrTx, q: Crud, id: unknown, path: string, what: string, out: ErrorDetail[]): Promise<Row | undefined> {
  if (typeof id !== 'number') return undefined;
  const row = await q.get(db, { id });
  if (!row) out.push({ path, message: `No ${what} with id ${id}` });
  return row;
}

const RESOURCES: Resource[] = [
  {
    kind: 'area',
    plural: 'areas',
    one: 'area',
    label: 'area',
    crud: areaQueries as unknown as Crud,
    createSchema: areaCreateBodySchema,
    editable: (r) => pick(r, ['code', 'name', 'description']),
    keyField: 'code',
    checkRefs: async () => [],
    toDtos: async (_db, rows) => rows.map((r) => toArea(r as never)),
  },
  {
    kind: 'site',
    plural: 'sites',
    one: 'site',
    label: 'site',
    crud: siteQueries as unknown as Crud,
    createSchema: siteCreateBodySchema,
    editable: (r) => pick(r, ['code', 'name', 'areaId', 'kV', 'x', 'y']),
    keyField: 'code',
    checkRefs: async (db, v) => {
      const out: ErrorDetail[] = [];
      await mustExist(db, areaQueries as unknown as Crud, v.areaId, 'areaId', 'area', out);
      return out;
    },
    toDtos: async (_db, rows) => rows.map((r) => toSite(r as never)),
  },
  {
    kind: 'pmu',
    plural: 'pmus',
    one: 'pmu',
    label: 'PMU',
    crud: pmuQueries as unknown as Crud,
    createSchema: pmuCreateBodySchema,
    editable: (r) => pick(r, ['code', 'name', 'siteId', 'reportingRate', 'description']),
    keyField: 'code',
    checkRefs: async (db, v, id) => {
      const out: ErrorDetail[] = [];
      await mustExist(db, siteQueries as unknown as Crud, v.siteId, 'siteId', 'site', out);
      if (id !== null && out.length === 0) {
        // Moving a PMU to another site would leave its channels at the old one.
        const own = (await channelQueries.list(db)).filter((c) => c.pmuId === id && c.siteId !== v.siteId);
        if (own.length > 0) {
          out.push({ path: 'siteId', message: `${own.length} channel(s) of this PMU are at its current site; move or delete them first` });
        }
      }
      return out;
    },
    toDtos: async (_db, rows) => rows.map((r) => toPmu(r as never)),
  },
  {
    kind: 'channel',
    plural: 'channels',
    one: 'channel',
    label: 'channel',
    crud: channelQueries as unknown as Crud,
    createSchema: channelCreateBodySchema,
    editable: (r) => pick(r, ['name', 'siteId', 'pmuId', 'kind', 'unit', 'description']),
    keyField: 'name',
    checkRefs: async (db, v) => {
      const out: ErrorDetail[] = [];
      await mustExist(db, siteQueries as unknown as Crud, v.siteId, 'siteId', 'site', out);
      const pmu = await mustExist(db, pmuQueries as unknown as Crud, v.pmuId, 'pmuId', 'PMU', out);
      if (pmu && pmu.siteId !== v.siteId) out.push({ path: 'pmuId', message: 'The PMU is at another site than the channel' });
      return out;
    },
    toDtos: async (_db, rows) => rows.map((r) => toChannel(r as never)),
  },
  {
    kind: 'corridor',
    plural: 'corridors',
    one: 'corridor',
    label: 'corridor',
    crud: corridorQueries as unknown as Crud,
    createSchema: corridorCreateBodySchema,
    editable: (r) =>
      pick(r, ['code', 'name', 'fromSiteId', 'toSiteId', 'kV', 'flowChannelId', 'fromAngleChannelId', 'toAngleChannelId']),
    keyField: 'code',
    checkRefs: async (db, v) => {
      const out: ErrorDetail[] = [];
      const sites = siteQueries as unknown as Crud;
      const chans = channelQueries as unknown as Crud;
      await mustExist(db, sites, v.fromSiteId, 'fromSiteId', 'site', out);
      await mustExist(db, sites, v.toSiteId, 'toSiteId', 'site', out);
      const flow = await mustExist(db, chans, v.flowChannelId, 'flowChannelId', 'channel', out);
      if (flow && flow.kind !== 'flow') out.push({ path: 'flowChannelId', message: `Must be a flow channel (this one is ${String(flow.kind)})` });
      if (flow && flow.siteId !== v.fromSiteId && flow.siteId !== v.toSiteId) {
        out.push({ path: 'flowChannelId', message: 'Must be measured at one end of the corridor' });
      }
      for (const [field, end] of [
        ['fromAngleChannelId', 'fromSiteId'],
        ['toAngleChannelId', 'toSiteId'],
      ] as const) {
        const ch = await mustExist(db, chans, v[field], field, 'channel', out);
        if (ch && ch.kind !== 'angle') out.push({ path: field, message: `Must be an angle channel (this one is ${String(ch.kind)})` });
        else if (ch && ch.siteId !== v[end]) out.push({ path: field, message: `Must be measured at the corridor's ${end === 'fromSiteId' ? 'from' : 'to'} site` });
      }
      return out;
    },
    toDtos: async (_db, rows) => rows.map((r) => toCorridor(r as never)),
  },
  {
    kind: 'track',
    plural: 'tracks',
    one: 'track',
    label: 'mode track',
    crud: trackQueries as unknown as Crud,
    createSchema: trackCreateBodySchema,
    editable: (r) =>
      pick(r, ['code', 'name', 'description', 'minHz', 'maxHz', 'poorBelow', 'lowBelow', 'corridorId', 'reference']),
    keyField: 'code',
    checkRefs: async (db, v) => {
      const out: ErrorDetail[] = [];
      await mustExist(db, corridorQueries as unknown as Crud, v.corridorId, 'corridorId', 'corridor', out);
      const ref = v.reference as { groupA: string[]; groupB: string[] };
      const known = new Set((await sitesByCodes(db, { codes: [...ref.groupA, ...ref.groupB] })).map((s) => s.code));
      for (const group of ['groupA', 'groupB'] as const) {
        ref[group].forEach((code, i) => {
          if (!known.has(code)) out.push({ path: `reference.${group}.${i}`, message: `No site with code "${code}"` });
        });
      }
      return out;
    },
    toDtos: async (db, rows) => {
      const latest = await latestEstimatesByTrack(db, { trackIds: rows.map((r) => r.id) });
      return rows.map((r) => toTrack(r as unknown as TrackRow, latest.get(r.id)));
    },
  },
];

function describe(res: Resource, row: Row): string {
  return `${res.label} "${String(row.name ?? row[res.keyField])}"`;
}

function plural(n: number, word: string): string {
  if (n === 1) return `1 ${word}`;
  return `${n} ${word.endsWith('y') ? `${word.slice(0, -1)}ies` : `${word}s`}`;
}

/** A taken code (or channel name) is the unique constraint's call: 409 naming the field. */
async function guardUnique<T>(res: Resource, v: Values, fn: () => Promise<T>): Promise<T> {
  try {
    return await fn();
  } catch (err) {
    if (pgErrorOf(err)?.code === '23505') throw duplicate(res, v);
    throw err;
  }
}

function duplicate(res: Resource, v: Values): ConflictError {
  const key = String(v[res.keyField]);
  const article = /^[aeiou]/i.test(res.label) ? 'An' : 'A';
  return new ConflictError(`${article} ${res.label} with ${res.keyField} "${key}" already exists`, [
    { path: res.keyField, message: 'Already in use' },
  ]);
}

async function checkRefs(db: DbOrTx, res: Resource, v: Values, id: number | null): Promise<void> {
  const details = await res.checkRefs(db, v, id);
  if (details.length) throw validationError(details);
}

function changedFields(before: Values, after: Values): string[] {
  return Object.keys(after).filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k]));
}

/** The part of a route context these generic handlers use (typed loosely across six resources). */
interface Ctx {
  deps: Deps;
  params: { id: number };
  body: Values;
  person: PersonRow | null;
  ip: string | null;
}

function resourceRoutes(res: Resource): RouteDef[] {
  const key = (op: string) => `${res.plural}.${op}` as EndpointKey;
  const one = async (db: DbOrTx, row: Row) => ({ [res.one]: (await res.toDtos(db, [row]))[0] });
  const audit = (db: DbOrTx, ctx: Ctx, action: string, row: Row, details: Record<string, unknown>) =>
    recordAudit(db, { personId: ctx.person!.id, action: `network.${action}`, target: `${res.kind}:${String(row[res.keyField])}`, details, ip: ctx.ip });

  const list = async ({ deps }: { deps: Deps }) => ({ [res.plural]: await res.toDtos(deps.db, await res.crud.list(deps.db)) });

  const create = async (ctx: Ctx) => {
    const v = ctx.body;
    return ctx.deps.db.transaction(async (tx) => {
      await checkRefs(tx, res, v, null);
      const row = await guardUnique(res, v, () => res.crud.insert(tx, { values: v }));
      await audit(tx, ctx, 'create', row, { values: v });
      return one(tx, row);
    });
  };

  const update = async (ctx: Ctx) =>
    ctx.deps.db.transaction(async (tx) => {
      const before = await res.crud.get(tx, { id: ctx.params.id });
      if (!before) throw new NotFoundError(`No ${res.label} with id ${ctx.params.id}`);
      const merged = { ...res.editable(before), ...ctx.body };
      const parsed = res.createSchema.safeParse(merged);
      if (!parsed.success) throw validationErrorFromZod(parsed.error, merged);
      const v = parsed.data as Values;
      await checkRefs(tx, res, v, before.id);
      const changed = changedFields(res.editable(before), v);
      if (changed.length === 0) return one(tx, before);
      const row = await guardUnique(res, v, () => res.crud.update(tx, { id: before.id, values: v }));
      await audit(tx, ctx, 'update', row!, {
        changed: Object.fromEntries(changed.map((k) => [k, { from: res.editable(before)[k], to: v[k] }])),
      });
      return one(tx, row!);
    });

  const remove = async (ctx: Ctx) =>
    ctx.deps.db.transaction(async (tx) => {
      const row = await res.crud.get(tx, { id: ctx.params.id });
      if (!row) throw new NotFoundError(`No ${res.label} with id ${ctx.params.id}`);
      const refs = await referencesTo(tx, { kind: res.kind, id: row.id });
      if (refs.length > 0) {
        const what = refs.map((r) => plural(r.count, r.what));
        throw new ConflictError(
          `Cannot delete ${describe(res, row)}: ${what.join(', ')} still refer${refs.length === 1 && refs[0].count === 1 ? 's' : ''} to it`,
          refs.map((r) => ({ path: '', message: `${plural(r.count, r.what)} refer to it` })),
        );
      }
      await res.crud.remove(tx, { id: row.id });
      await audit(tx, ctx, 'delete', row, { values: res.editable(row) });
      return { ok: true as const };
    });

  return [
    route(key('list'), list as never),
    route(key('create'), create as never),
    route(key('update'), update as never),
    route(key('remove'), remove as never),
  ];
}

export function networkRoutes(): RouteDef[] {
  return [
    route('network.get', async ({ deps }) => {
      const byPlural = Object.fromEntries(
        await Promise.all(RESOURCES.map(async (r) => [r.plural, await r.toDtos(deps.db, await r.crud.list(deps.db))] as const)),
      );
      return byPlural as never;
    }),
    ...RESOURCES.flatMap(resourceRoutes),
  ];
}
