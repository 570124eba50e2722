// The network model: everyone signed in reads it; admins and engineers edit it. Every edit is
// checked as a whole (an update is merged into the stored row and validated like a create),
// references must exist and make sense, deleting what is still referred to is refused with 409,
// and each change is written to the audit log in the same transaction.
//
// The six kinds differ only in what their description below says (fields, unique key, reference
// rules, how a row is answered); one route builder serves them all, so a rule about editing the
// network (audit, 404/409 wording, merge-then-validate) holds for every kind at once.
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

// The query sets are typed per table; the generic handlers only pass rows through.
const QUERIES = {
  area: areaQueries,
  site: siteQueries,
  pmu: pmuQueries,
  channel: channelQueries,
  corridor: corridorQueries,
  track: trackQueries,
} as unknown as Record<NetworkKind, Crud>;

/** How messages name a kind ("No PMU with id 7", "Cannot delete mode track …"). */
const LABEL: Record<NetworkKind, string> = {
  area: 'area',
  site: 'site',
  pmu: 'PMU',
  channel: 'channel',
  corridor: 'corridor',
  track: 'mode track',
};

/**
 * A field holding the id of another record: it must exist, and `check` then says what is wrong
 * with the one found (wrong kind of channel, another site). Rules run in the order listed, which
 * is the order of the 400 details.
 */
interface RefRule {
  field: string;
  to: NetworkKind;
  check?: (found: Row, v: Values) => string[];
}

interface ResourceSpec {
  kind: NetworkKind;
  createSchema: z.ZodType;
  /** The fields of the create body: what a PATCH is merged into, what the audit compares. */
  fields: readonly string[];
  /** Which field holds the unique key (409 messages and audit targets point at it). */
  keyField?: 'code' | 'name';
  refs?: RefRule[];
  /** Rules across records beyond single references; `refsOk` is false when a reference failed. */
  crossCheck?: (db: DbOrTx, v: Values, id: number | null, refsOk: boolean) => Promise<ErrorDetail[]>;
  toDtos(db: DbOrTx, rows: Row[]): Promise<unknown[]>;
}

interface Resource extends Required<Omit<ResourceSpec, 'crossCheck'>>, Pick<ResourceSpec, 'crossCheck'> {
  /** URL segment, endpoint-key prefix and list key in responses, e.g. "sites". */
  plural: `${NetworkKind}s`;
  label: string;
  crud: Crud;
}

function resource(spec: ResourceSpec): Resource {
  return { keyField: 'code', refs: [], ...spec, plural: `${spec.kind}s`, label: LABEL[spec.kind], crud: QUERIES[spec.kind] };
}

/** A DTO mapper applied row by row, for kinds whose answer needs nothing beyond the row. */
const each =
  <R,>(to: (row: R) => unknown) =>
  async (_db: DbOrTx, rows: Row[]) =>
    rows.map((r) => to(r as unknown as R));

const RESOURCES: Resource[] = [
  resource({
    kind: 'area',
    createSchema: areaCreateBodySchema,
    fields: ['code', 'name', 'description'],
    toDtos: each(toArea),
  }),
  resource({
    kind: 'site',
    createSchema: siteCreateBodySchema,
    fields: ['code', 'name', 'areaId', 'kV', 'x', 'y'],
    refs: [{ field: 'areaId', to: 'area' }],
    toDtos: each(toSite),
  }),
  resource({
    kind: 'pmu',
    createSchema: pmuCreateBodySchema,
    fields: ['code', 'name', 'siteId', 'reportingRate', 'description'],
    refs: [{ field: 'siteId', to: 'site' }],
    crossCheck: async (db, v, id, refsOk) => {
      if (id === null || !refsOk) return [];
      // Moving a PMU to another site would leave its channels at the old one.
      const own = (await channelQueries.list(db)).filter((c) => c.pmuId === id && c.siteId !== v.siteId);
      return own.length > 0 ? [{ path: 'siteId', message: `${own.length} channel(s) of this PMU are at its current site; move or delete them first` }] : [];
    },
    toDtos: each(toPmu),
  }),
  resource({
    kind: 'channel',
    createSchema: channelCreateBodySchema,
    fields: ['name', 'siteId', 'pmuId', 'kind', 'unit', 'description'],
    // Channel names are the column names of uploaded files, so the name is the unique key.
    keyField: 'name',
    refs: [
      { field: 'siteId', to: 'site' },
      { field: 'pmuId', to: 'pmu', check: (pmu, v) => (pmu.siteId !== v.siteId ? ['The PMU is at another site than the channel'] : []) },
    ],
    toDtos: each(toChannel),
  }),
  resource({
    kind: 'corridor',
    createSchema: corridorCreateBodySchema,
    fields: ['code', 'name', 'fromSiteId', 'toSiteId', 'kV', 'flowChannelId', 'fromAngleChannelId', 'toAngleChannelId'],
    refs: [
      { field: 'fromSiteId', to: 'site' },
      { field: 'toSiteId', to: 'site' },
      {
        field: 'flowChannelId',
        to: 'channel',
        check: (flow, v) => [
          ...(flow.kind !== 'flow' ? [`Must be a flow channel (this one is ${String(flow.kind)})`] : []),
          ...(flow.siteId !== v.fromSiteId && flow.siteId !== v.toSiteId ? ['Must be measured at one end of the corridor'] : []),
        ],
      },
      { field: 'fromAngleChannelId', to: 'channel', check: angleAt('fromSiteId', 'from') },
      { field: 'toAngleChannelId', to: 'channel', check: angleAt('toSiteId', 'to') },
    ],
    toDtos: each(toCorridor),
  }),
  resource({
    kind: 'track',
    createSchema: trackCreateBodySchema,
    fields: ['code', 'name', 'description', 'minHz', 'maxHz', 'poorBelow', 'lowBelow', 'corridorId', 'reference'],
    refs: [{ field: 'corridorId', to: 'corridor' }],
    crossCheck: async (db, v) => {
      const out: ErrorDetail[] = [];
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
  }),
];

/** A corridor end's angle channel: an angle, measured at that end's site. */
function angleAt(end: 'fromSiteId' | 'toSiteId', word: 'from' | 'to') {
  return (ch: Row, v: Values): string[] => {
    if (ch.kind !== 'angle') return [`Must be an angle channel (this one is ${String(ch.kind)})`];
    return ch.siteId !== v[end] ? [`Must be measured at the corridor's ${word} site`] : [];
  };
}

const pick = (row: Row, keys: readonly string[]): Values => Object.fromEntries(keys.map((k) => [k, row[k]]));

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
  const out: ErrorDetail[] = [];
  for (const rule of res.refs) {
    const ref = v[rule.field];
    // null is "none" where the schema allows it; other types were refused by the schema already.
    if (typeof ref !== 'number') continue;
    const found = await QUERIES[rule.to].get(db, { id: ref });
    if (!found) out.push({ path: rule.field, message: `No ${LABEL[rule.to]} with id ${ref}` });
    else for (const message of rule.check?.(found, v) ?? []) out.push({ path: rule.field, message });
  }
  if (res.crossCheck) out.push(...(await res.crossCheck(db, v, id, out.length === 0)));
  if (out.length) throw validationError(out);
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

/** list, create, update and remove of one kind, each an entry of the endpoint catalogue. */
function resourceRoutes(res: Resource): RouteDef[] {
  const key = (op: string) => `${res.plural}.${op}` as EndpointKey;
  const editable = (row: Row) => pick(row, res.fields);
  const one = async (db: DbOrTx, row: Row) => ({ [res.kind]: (await res.toDtos(db, [row]))[0] });
  const stored = async (db: DbOrTx, id: number) => {
    const row = await res.crud.get(db, { id });
    if (!row) throw new NotFoundError(`No ${res.label} with id ${id}`);
    return row;
  };
  const audit = (db: DbOrTx, ctx: Ctx, action: string, row: Row, details: Record<string, unknown>) =>
    recordAudit(db, { personId: ctx.person!.id, action: `network.${action}`, target: `${res.kind}:${String(row[res.keyField])}`, details, ip: ctx.ip });

  const list = async ({ deps }: { deps: Deps }) => ({ [res.plural]: await res.toDtos(deps.db, await res.crud.list(deps.db)) });

  const create = async (ctx: Ctx) =>
    ctx.deps.db.transaction(async (tx) => {
      const v = ctx.body;
      await checkRefs(tx, res, v, null);
      const row = await guardUnique(res, v, () => res.crud.insert(tx, { values: v }));
      await audit(tx, ctx, 'create', row, { values: v });
      return one(tx, row);
    });

  const update = async (ctx: Ctx) =>
    ctx.deps.db.transaction(async (tx) => {
      const before = await stored(tx, ctx.params.id);
      const was = editable(before);
      const merged = { ...was, ...ctx.body };
      const parsed = res.createSchema.safeParse(merged);
      if (!parsed.success) throw validationErrorFromZod(parsed.error, merged);
      const v = parsed.data as Values;
      await checkRefs(tx, res, v, before.id);
      const changed = changedFields(was, v);
      if (changed.length === 0) return one(tx, before);
      const row = await guardUnique(res, v, () => res.crud.update(tx, { id: before.id, values: v }));
      await audit(tx, ctx, 'update', row!, { changed: Object.fromEntries(changed.map((k) => [k, { from: was[k], to: v[k] }])) });
      return one(tx, row!);
    });

  const remove = async (ctx: Ctx) =>
    ctx.deps.db.transaction(async (tx) => {
      const row = await stored(tx, ctx.params.id);
      const refs = await referencesTo(tx, { kind: res.kind, id: row.id });
      if (refs.length > 0) {
        const what = refs.map((r) => plural(r.count, r.what));
        throw new ConflictError(
          `Cannot delete ${describe(res, row)}: ${what.join(', ')} still refer${refs.length === 1 && refs[0].count === 1 ? 's' : ''} to it`,
          refs.map((r) => ({ path: '', message: `${plural(r.count, r.what)} refer to it` })),
        );
      }
      await res.crud.remove(tx, { id: row.id });
      await audit(tx, ctx, 'delete', row, { values: editable(row) });
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
