// The API catalogue: every endpoint's method, path, who may call it and its zod schemas. The
// server mounts exactly these (server/routes/*.ts give each a handler; a route missing here does
// not exist), and the web client can build requests and parse answers from the same entries.
// Paths use Express syntax; fill parameters with buildPath() from ./common.
import type { z } from 'zod';
import type { Access } from '../roles';
import { csrfResponseSchema, meResponseSchema, signInBodySchema, signInResponseSchema } from './auth';
import { idParamsSchema, okSchema } from './common';
import { healthResponseSchema } from './health';
import {
  invitationAcceptBodySchema,
  invitationAcceptResponseSchema,
  invitationCreateBodySchema,
  invitationListResponseSchema,
  invitationLookupResponseSchema,
  invitationResponseSchema,
  invitationTokenParamsSchema,
} from './invitations';
import {
  areaCreateBodySchema,
  areaListResponseSchema,
  areaResponseSchema,
  areaUpdateBodySchema,
  channelCreateBodySchema,
  channelListResponseSchema,
  channelResponseSchema,
  channelUpdateBodySchema,
  corridorCreateBodySchema,
  corridorListResponseSchema,
  corridorResponseSchema,
  corridorUpdateBodySchema,
  networkResponseSchema,
  pmuCreateBodySchema,
  pmuListResponseSchema,
  pmuResponseSchema,
  pmuUpdateBodySchema,
  siteCreateBodySchema,
  siteListResponseSchema,
  siteResponseSchema,
  siteUpdateBodySchema,
  trackCreateBodySchema,
  trackListResponseSchema,
  trackResponseSchema,
  trackUpdateBodySchema,
} from './network';
import { outboxListQuerySchema, outboxListResponseSchema, outboxMessageResponseSchema } from './outbox';
import { peopleListResponseSchema, personResponseSchema, personUpdateBodySchema } from './people';
import {
  passwordResetCompleteBodySchema,
  passwordResetRequestBodySchema,
  passwordResetRequestResponseSchema,
} from './password-reset';
import { ANALYSIS_ENDPOINTS } from './analysis-endpoints';
import { RECORDING_ENDPOINTS } from './recordings';

export type HttpMethod = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export interface EndpointDef {
  method: HttpMethod;
  path: string;
  access: Access;
  /** Success status. */
  status: number;
  summary: string;
  params?: z.ZodType;
  query?: z.ZodType;
  body?: z.ZodType;
  response: z.ZodType;
}

const e = <T extends EndpointDef>(d: T) => d;

/** CRUD quintet of one network resource: list (view), create/update/delete (editNetwork). */
function networkCrud<L extends z.ZodType, C extends z.ZodType, U extends z.ZodType, R extends z.ZodType>(
  plural: string,
  schemas: { list: L; create: C; update: U; one: R },
) {
  const base = `/api/network/${plural}`;
  return {
    list: e({ method: 'GET', path: base, access: 'view', status: 200, summary: `List ${plural}`, response: schemas.list }),
    create: e({
      method: 'POST',
      path: base,
      access: 'editNetwork',
      status: 201,
      summary: `Create one of the ${plural}`,
      body: schemas.create,
      response: schemas.one,
    }),
    update: e({
      method: 'PATCH',
      path: `${base}/:id`,
      access: 'editNetwork',
      status: 200,
      summary: `Change one of the ${plural}`,
      params: idParamsSchema,
      body: schemas.update,
      response: schemas.one,
    }),
    remove: e({
      method: 'DELETE',
      path: `${base}/:id`,
      access: 'editNetwork',
      status: 200,
      summary: `Delete one of the ${plural} (409 while anything refers to it)`,
      params: idParamsSchema,
      response: okSchema,
    }),
  } as const;
}

const areas = networkCrud('areas', {
  list: areaListResponseSchema,
  create: areaCreateBodySchema,
  update: areaUpdateBodySchema,
  one: areaResponseSchema,
});
const sites = networkCrud('sites', {
  list: siteListResponseSchema,
  create: siteCreateBodySchema,
  update: siteUpdateBodySchema,
  one: siteResponseSchema,
});
const pmus = networkCrud('pmus', {
  list: pmuListResponseSchema,
  create: pmuCreateBodySchema,
  update: pmuUpdateBodySchema,
  one: pmuResponseSchema,
});
const channels = networkCrud('channels', {
  list: channelListResponseSchema,
  create: channelCreateBodySchema,
  update: channelUpdateBodySchema,
  one: channelResponseSchema,
});
const corridors = networkCrud('corridors', {
  list: corridorListResponseSchema,
  create: corridorCreateBodySchema,
  update: corridorUpdateBodySchema,
  one: corridorResponseSchema,
});
const tracks = networkCrud('tracks', {
  list: trackListResponseSchema,
  create: trackCreateBodySchema,
  update: trackUpdateBodySchema,
  one: trackResponseSchema,
});

export const ENDPOINTS = {
  // health
  'health.get': e({ method: 'GET', path: '/api/health', access: 'public', status: 200, summary: 'Database, Redis and worker status (503 when the database or Redis is down)', response: healthResponseSchema }),

  // auth
  'auth.csrf': e({ method: 'GET', path: '/api/auth/csrf', access: 'public', status: 200, summary: 'CSRF token of this session', response: csrfResponseSchema }),
  'auth.signIn': e({ method: 'POST', path: '/api/auth/sign-in', access: 'public', status: 200, summary: 'Sign in (rate-limited: 10 per minute per address and e-mail)', body: signInBodySchema, response: signInResponseSchema }),
  'auth.signOut': e({ method: 'POST', path: '/api/auth/sign-out', access: 'signedIn', status: 200, summary: 'Sign out (ends the session)', response: okSchema }),
  'auth.me': e({ method: 'GET', path: '/api/auth/me', access: 'signedIn', status: 200, summary: 'The signed-in person, their permissions and the CSRF token', response: meResponseSchema }),

  // people
  'people.list': e({ method: 'GET', path: '/api/people', access: 'managePeople', status: 200, summary: 'Everyone with an account', response: peopleListResponseSchema }),
  'people.update': e({ method: 'PATCH', path: '/api/people/:id', access: 'managePeople', status: 200, summary: 'Change role and/or disable / enable', params: idParamsSchema, body: personUpdateBodySchema, response: personResponseSchema }),

  // invitations
  'invitations.list': e({ method: 'GET', path: '/api/invitations', access: 'managePeople', status: 200, summary: 'Invitations, newest first', response: invitationListResponseSchema }),
  'invitations.create': e({ method: 'POST', path: '/api/invitations', access: 'managePeople', status: 201, summary: 'Invite an e-mail address with a role (sends the link by e-mail)', body: invitationCreateBodySchema, response: invitationResponseSchema }),
  'invitations.revoke': e({ method: 'DELETE', path: '/api/invitations/:id', access: 'managePeople', status: 200, summary: 'Revoke a pending invitation', params: idParamsSchema, response: invitationResponseSchema }),
  'invitations.lookup': e({ method: 'GET', path: '/api/invitations/token/:token', access: 'public', status: 200, summary: 'E-mail and role of a pending invitation link', params: invitationTokenParamsSchema, response: invitationLookupResponseSchema }),
  'invitations.accept': e({ method: 'POST', path: '/api/invitations/accept', access: 'public', status: 201, summary: 'Accept: set display name and password, creating the account', body: invitationAcceptBodySchema, response: invitationAcceptResponseSchema }),

  // password reset
  'passwordReset.request': e({ method: 'POST', path: '/api/password-reset/request', access: 'public', status: 200, summary: 'E-mail a reset link if the address has an account (same answer either way)', body: passwordResetRequestBodySchema, response: passwordResetRequestResponseSchema }),
  'passwordReset.complete': e({ method: 'POST', path: '/api/password-reset/complete', access: 'public', status: 200, summary: 'Set a new password with the e-mailed token; ends existing sessions', body: passwordResetCompleteBodySchema, response: okSchema }),

  // outbox
  'outbox.list': e({ method: 'GET', path: '/api/outbox', access: 'managePeople', status: 200, summary: 'Messages received by the local SMTP sink, newest first', query: outboxListQuerySchema, response: outboxListResponseSchema }),
  'outbox.get': e({ method: 'GET', path: '/api/outbox/:id', access: 'managePeople', status: 200, summary: 'One message with its text and HTML', params: idParamsSchema, response: outboxMessageResponseSchema }),

  // network
  'network.get': e({ method: 'GET', path: '/api/network', access: 'view', status: 200, summary: 'The whole network model', response: networkResponseSchema }),
  'areas.list': areas.list,
  'areas.create': areas.create,
  'areas.update': areas.update,
  'areas.remove': areas.remove,
  'sites.list': sites.list,
  'sites.create': sites.create,
  'sites.update': sites.update,
  'sites.remove': sites.remove,
  'pmus.list': pmus.list,
  'pmus.create': pmus.create,
  'pmus.update': pmus.update,
  'pmus.remove': pmus.remove,
  'channels.list': channels.list,
  'channels.create': channels.create,
  'channels.update': channels.update,
  'channels.remove': channels.remove,
  'corridors.list': corridors.list,
  'corridors.create': corridors.create,
  'corridors.update': corridors.update,
  'corridors.remove': corridors.remove,
  'tracks.list': tracks.list,
  'tracks.create': tracks.create,
  'tracks.update': tracks.update,
  'tracks.remove': tracks.remove,

  // scans, fits, Watch, trends, alerts, transfer studies, live events (shared/api/analysis-endpoints.ts)
  ...ANALYSIS_ENDPOINTS,

  // recordings: upload and ingest, list, detail, samples; one analysis (shared/api/recordings.ts)
  ...RECORDING_ENDPOINTS,
} as const satisfies Record<string, EndpointDef>;

export type EndpointKey = keyof typeof ENDPOINTS;
export const ENDPOINT_KEYS = Object.keys(ENDPOINTS) as EndpointKey[];

/** Methods that change state and therefore need the x-csrf-token header. */
export const STATE_CHANGING_METHODS: readonly HttpMethod[] = ['POST', 'PUT', 'PATCH', 'DELETE'];
