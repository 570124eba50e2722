// The network model: areas, sites (substations), PMUs, channels, corridors and mode tracks.
// Everyone signed in reads it; admins and engineers edit it (permission 'editNetwork').
// Create bodies are complete; update bodies (PATCH) carry any subset of the same fields, and the
// server checks the merged result with the create schema, so cross-field rules hold either way.
import { z } from 'zod';
import { BANDS, DEFAULT_LOW_BELOW, DEFAULT_POOR_BELOW } from '../bands';
import { isoDateTime } from './common';

const ref = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .int({ error: `${what} must be a whole number` })
    .positive({ error: `${what} must be a positive id` });

export const codeSchema = z
  .string({ error: 'Code is required' })
  .trim()
  .min(1, { error: 'Code is required' })
  .max(64, { error: 'Code must be at most 64 characters' })
  .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, {
    error: 'Code may hold lower-case letters, digits and single hyphens (e.g. "tarrow-valley")',
  });

const nameSchema = z
  .string({ error: 'Name is required' })
  .trim()
  .min(1, { error: 'Name is required' })
  .max(100, { error: 'Name must be at most 100 characters' });

const descriptionSchema = z
  .string({ error: 'Description must be text' })
  .trim()
  .max(500, { error: 'Description must be at most 500 characters' });

const kVSchema = z
  .number({ error: 'kV must be a number' })
  .positive({ error: 'kV must be positive' })
  .max(1500, { error: 'kV must be at most 1500' });

/** Update bodies must change something. */
const nonEmpty = <T extends object>(b: T) => Object.keys(b).length > 0;
const NON_EMPTY = { error: 'Give at least one field to change' };

// ---------------------------------------------------------------- areas
export const areaSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  description: z.string(),
});
export type Area = z.infer<typeof areaSchema>;

const areaFields = z.object({ code: codeSchema, name: nameSchema, description: descriptionSchema.default('') }).strict();
export const areaCreateBodySchema = areaFields;
export type AreaCreateBody = z.input<typeof areaCreateBodySchema>;
export const areaUpdateBodySchema = z
  .object({ code: codeSchema, name: nameSchema, description: descriptionSchema })
  .partial()
  .strict()
  .refine(nonEmpty, NON_EMPTY);
export type AreaUpdateBody = z.infer<typeof areaUpdateBodySchema>;

// ---------------------------------------------------------------- sites
export const siteSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  areaId: z.number().int(),
  kV: z.number(),
  /** Placement on a 0..100 schematic grid (x east, y north); not geographic. */
  x: z.number(),
  y: z.number(),
});
export type Site = z.infer<typeof siteSchema>;

const schematic = (axis: 'x' | 'y') =>
  z
    .number({ error: `${axis} must be a number` })
    .min(0, { error: `${axis} must be between 0 and 100` })
    .max(100, { error: `${axis} must be between 0 and 100` });

const siteShape = {
  code: codeSchema,
  name: nameSchema,
  areaId: ref('areaId'),
  kV: kVSchema,
  x: schematic('x'),
  y: schematic('y'),
};
export const siteCreateBodySchema = z.object(siteShape).strict();
export type SiteCreateBody = z.infer<typeof siteCreateBodySchema>;
export const siteUpdateBodySchema = z.object(siteShape).partial().strict().refine(nonEmpty, NON_EMPTY);
export type SiteUpdateBody = z.infer<typeof siteUpdateBodySchema>;

// ---------------------------------------------------------------- PMUs
/** Reporting rates of IEEE C37.118.1 for 50 Hz and 60 Hz systems, frames/s (standard). */
export const REPORTING_RATES = [10, 12, 15, 20, 25, 30, 50, 60] as const;

export const pmuSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  siteId: z.number().int(),
  reportingRate: z.number(),
  description: z.string(),
});
export type Pmu = z.infer<typeof pmuSchema>;

const pmuShape = {
  code: codeSchema,
  name: nameSchema,
  siteId: ref('siteId'),
  reportingRate: z
    .number({ error: 'reportingRate must be a number' })
    .refine((r) => (REPORTING_RATES as readonly number[]).includes(r), {
      error: `reportingRate must be one of ${REPORTING_RATES.join(', ')} frames/s`,
    }),
  description: descriptionSchema,
};
export const pmuCreateBodySchema = z.object({ ...pmuShape, description: descriptionSchema.default('') }).strict();
export type PmuCreateBody = z.input<typeof pmuCreateBodySchema>;
export const pmuUpdateBodySchema = z.object(pmuShape).partial().strict().refine(nonEmpty, NON_EMPTY);
export type PmuUpdateBody = z.infer<typeof pmuUpdateBodySchema>;

// ---------------------------------------------------------------- channels
export const CHANNEL_KINDS = ['angle', 'frequency', 'flow', 'voltage'] as const;
export type ChannelKind = (typeof CHANNEL_KINDS)[number];
export const CHANNEL_UNITS = ['deg', 'Hz', 'MW', 'kV', 'pu'] as const;
export type ChannelUnit = (typeof CHANNEL_UNITS)[number];
/** Units allowed for each kind (angles in degrees; voltage magnitude in kV or per unit). */
export const UNITS_OF_KIND: Record<ChannelKind, readonly ChannelUnit[]> = {
  angle: ['deg'],
  frequency: ['Hz'],
  flow: ['MW'],
  voltage: ['kV', 'pu'],
};

export const channelSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  siteId: z.number().int(),
  pmuId: z.number().int().nullable(),
  kind: z.enum(CHANNEL_KINDS),
  unit: z.enum(CHANNEL_UNITS),
  description: z.string(),
});
export type Channel = z.infer<typeof channelSchema>;

const channelShape = {
  /** The column name in uploaded files, e.g. "moorgate.angle". */
  name: z
    .string({ error: 'Name is required' })
    .trim()
    .min(1, { error: 'Name is required' })
    .max(100, { error: 'Name must be at most 100 characters' })
    .regex(/^[a-z0-9][a-z0-9._-]*$/, {
      error: 'Name may hold lower-case letters, digits, dots, hyphens and underscores (e.g. "moorgate.angle")',
    }),
  siteId: ref('siteId'),
  pmuId: ref('pmuId').nullable(),
  kind: z.enum(CHANNEL_KINDS, { error: `kind must be one of: ${CHANNEL_KINDS.join(', ')}` }),
  unit: z.enum(CHANNEL_UNITS, { error: `unit must be one of: ${CHANNEL_UNITS.join(', ')}` }),
  description: descriptionSchema,
};
export const channelCreateBodySchema = z
  .object({ ...channelShape, pmuId: channelShape.pmuId.default(null), description: descriptionSchema.default('') })
  .strict()
  .superRefine((c, ctx) => {
    if (!UNITS_OF_KIND[c.kind].includes(c.unit)) {
      ctx.addIssue({
        code: 'custom',
        path: ['unit'],
        message: `A ${c.kind} channel's unit must be ${UNITS_OF_KIND[c.kind].join(' or ')}`,
      });
    }
  });
export type ChannelCreateBody = z.input<typeof channelCreateBodySchema>;
export const channelUpdateBodySchema = z.object(channelShape).partial().strict().refine(nonEmpty, NON_EMPTY);
export type ChannelUpdateBody = z.infer<typeof channelUpdateBodySchema>;

// ---------------------------------------------------------------- corridors
export const corridorSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  fromSiteId: z.number().int(),
  toSiteId: z.number().int(),
  kV: z.number(),
  /** MW flow channel, positive from fromSite to toSite. */
  flowChannelId: z.number().int().nullable(),
  /** Angle channels at the two ends; their difference is the corridor angle. */
  fromAngleChannelId: z.number().int().nullable(),
  toAngleChannelId: z.number().int().nullable(),
});
export type Corridor = z.infer<typeof corridorSchema>;

const corridorShape = {
  code: codeSchema,
  name: nameSchema,
  fromSiteId: ref('fromSiteId'),
  toSiteId: ref('toSiteId'),
  kV: kVSchema,
  flowChannelId: ref('flowChannelId').nullable(),
  fromAngleChannelId: ref('fromAngleChannelId').nullable(),
  toAngleChannelId: ref('toAngleChannelId').nullable(),
};
export const corridorCreateBodySchema = z
  .object({
    ...corridorShape,
    flowChannelId: corridorShape.flowChannelId.default(null),
    fromAngleChannelId: corridorShape.fromAngleChannelId.default(null),
    toAngleChannelId: corridorShape.toAngleChannelId.default(null),
  })
  .strict()
  .superRefine((c, ctx) => {
    if (c.fromSiteId === c.toSiteId) {
      ctx.addIssue({ code: 'custom', path: ['toSiteId'], message: 'A corridor must join two different sites' });
    }
  });
export type CorridorCreateBody = z.input<typeof corridorCreateBodySchema>;
export const corridorUpdateBodySchema = z.object(corridorShape).partial().strict().refine(nonEmpty, NON_EMPTY);
export type CorridorUpdateBody = z.infer<typeof corridorUpdateBodySchema>;

// ---------------------------------------------------------------- mode tracks
/** Expected mode shape: site codes that swing together (groupA) against groupB. */
export const trackReferenceSchema = z
  .object({
    groupA: z.array(codeSchema).max(50, { error: 'At most 50 sites per group' }),
    groupB: z.array(codeSchema).max(50, { error: 'At most 50 sites per group' }),
  })
  .strict();
export type TrackReference = z.infer<typeof trackReferenceSchema>;

export const latestEstimateSchema = z.object({
  id: z.number().int(),
  at: isoDateTime,
  frequencyHz: z.number(),
  dampingPercent: z.number(),
  dampingLo: z.number().nullable(),
  dampingHi: z.number().nullable(),
  forced: z.boolean(),
  method: z.string(),
  band: z.enum(BANDS),
});
export type LatestEstimate = z.infer<typeof latestEstimateSchema>;

export const trackSchema = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  description: z.string(),
  /** Frequency band of the track, Hz. */
  minHz: z.number(),
  maxHz: z.number(),
  /** Damping thresholds, percent (poor below poorBelow, low below lowBelow, else ample). */
  poorBelow: z.number(),
  lowBelow: z.number(),
  corridorId: z.number().int().nullable(),
  reference: trackReferenceSchema,
  /** The newest estimate assigned to this track, null before the first scan or fit. */
  latestEstimate: latestEstimateSchema.nullable(),
});
export type Track = z.infer<typeof trackSchema>;

const percent = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .min(0, { error: `${what} must be between 0 and 100 %` })
    .max(100, { error: `${what} must be between 0 and 100 %` });
const hz = (what: string) =>
  z
    .number({ error: `${what} must be a number` })
    .positive({ error: `${what} must be above 0 Hz` })
    .max(30, { error: `${what} must be at most 30 Hz` });

const trackShape = {
  code: codeSchema,
  name: nameSchema,
  description: descriptionSchema,
  minHz: hz('minHz'),
  maxHz: hz('maxHz'),
  poorBelow: percent('poorBelow'),
  lowBelow: percent('lowBelow'),
  corridorId: ref('corridorId').nullable(),
  reference: trackReferenceSchema,
};
export const trackCreateBodySchema = z
  .object({
    ...trackShape,
    description: descriptionSchema.default(''),
    poorBelow: trackShape.poorBelow.default(DEFAULT_POOR_BELOW),
    lowBelow: trackShape.lowBelow.default(DEFAULT_LOW_BELOW),
    corridorId: trackShape.corridorId.default(null),
    reference: trackReferenceSchema.default({ groupA: [], groupB: [] }),
  })
  .strict()
  .superRefine((t, ctx) => {
    if (t.minHz >= t.maxHz) {
      ctx.addIssue({ code: 'custom', path: ['maxHz'], message: 'Must be above the lowest frequency (minHz)' });
    }
    if (t.poorBelow >= t.lowBelow) {
      ctx.addIssue({ code: 'custom', path: ['lowBelow'], message: 'Must be above the poor threshold (poorBelow)' });
    }
    const both = t.reference.groupA.filter((c) => t.reference.groupB.includes(c));
    if (both.length > 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['reference', 'groupB'],
        message: `A site cannot be in both groups: ${both.join(', ')}`,
      });
    }
  });
export type TrackCreateBody = z.input<typeof trackCreateBodySchema>;
export const trackUpdateBodySchema = z.object(trackShape).partial().strict().refine(nonEmpty, NON_EMPTY);
export type TrackUpdateBody = z.infer<typeof trackUpdateBodySchema>;

// ---------------------------------------------------------------- responses
export const areaListResponseSchema = z.object({ areas: z.array(areaSchema) });
export const areaResponseSchema = z.object({ area: areaSchema });
export const siteListResponseSchema = z.object({ sites: z.array(siteSchema) });
export const siteResponseSchema = z.object({ site: siteSchema });
export const pmuListResponseSchema = z.object({ pmus: z.array(pmuSchema) });
export const pmuResponseSchema = z.object({ pmu: pmuSchema });
export const channelListResponseSchema = z.object({ channels: z.array(channelSchema) });
export const channelResponseSchema = z.object({ channel: channelSchema });
export const corridorListResponseSchema = z.object({ corridors: z.array(corridorSchema) });
export const corridorResponseSchema = z.object({ corridor: corridorSchema });
export const trackListResponseSchema = z.object({ tracks: z.array(trackSchema) });
export const trackResponseSchema = z.object({ track: trackSchema });

/** GET /api/network: the whole model in one answer (the Network screen and the Watch screen). */
export const networkResponseSchema = z.object({
  areas: z.array(areaSchema),
  sites: z.array(siteSchema),
  pmus: z.array(pmuSchema),
  channels: z.array(channelSchema),
  corridors: z.array(corridorSchema),
  tracks: z.array(trackSchema),
});
export type NetworkResponse = z.infer<typeof networkResponseSchema>;
