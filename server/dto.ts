// Database rows → the API shapes of shared/api (dates become ISO strings in JSON).
import type { InvitationWithInviter } from '../db/queries/invitations';
import { invitationStatus } from '../db/queries/invitations';
import type {
  AreaRow,
  ChannelRow,
  CorridorRow,
  EstimateRow,
  PmuRow,
  SiteRow,
  TrackRow,
} from '../db/queries/network';
import type { OutboxRow } from '../db/queries/outbox';
import type { PersonRow } from '../db/queries/people';
import type { Person } from '../shared/api/auth';
import type { Invitation } from '../shared/api/invitations';
import type { Area, Channel, Corridor, LatestEstimate, Pmu, Site, Track } from '../shared/api/network';
import type { OutboxMessage, OutboxSummary } from '../shared/api/outbox';
import { bandOf } from '../shared/bands';

const iso = (d: Date) => d.toISOString();
const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null);

export function toPerson(p: PersonRow): Person {
  return { id: p.id, email: p.email, displayName: p.displayName, role: p.role, disabled: p.disabled, createdAt: iso(p.createdAt) };
}

export function toInvitation(i: InvitationWithInviter, now: Date): Invitation {
  return {
    id: i.id,
    email: i.email,
    role: i.role,
    status: invitationStatus(i, now),
    invitedBy: i.invitedBy !== null && i.inviterName !== null ? { id: i.invitedBy, displayName: i.inviterName } : null,
    createdAt: iso(i.createdAt),
    expiresAt: iso(i.expiresAt),
    usedAt: isoOrNull(i.usedAt),
    revokedAt: isoOrNull(i.revokedAt),
  };
}

export function toOutboxSummary(m: Pick<OutboxRow, 'id' | 'from' | 'to' | 'subject' | 'receivedAt'>): OutboxSummary {
  return { id: m.id, from: m.from, to: m.to, subject: m.subject, receivedAt: iso(m.receivedAt) };
}

export function toOutboxMessage(m: OutboxRow): OutboxMessage {
  return { ...toOutboxSummary(m), text: m.text, html: m.html, messageId: m.messageId };
}

export const toArea = (a: AreaRow): Area => ({ id: a.id, code: a.code, name: a.name, description: a.description });
export const toSite = (s: SiteRow): Site => ({ id: s.id, code: s.code, name: s.name, areaId: s.areaId, kV: s.kV, x: s.x, y: s.y });
export const toPmu = (p: PmuRow): Pmu => ({
  id: p.id,
  code: p.code,
  name: p.name,
  siteId: p.siteId,
  reportingRate: p.reportingRate,
  description: p.description,
});
export const toChannel = (c: ChannelRow): Channel => ({
  id: c.id,
  name: c.name,
  siteId: c.siteId,
  pmuId: c.pmuId,
  kind: c.kind,
  unit: c.unit,
  description: c.description,
});
export const toCorridor = (c: CorridorRow): Corridor => ({
  id: c.id,
  code: c.code,
  name: c.name,
  fromSiteId: c.fromSiteId,
  toSiteId: c.toSiteId,
  kV: c.kV,
  flowChannelId: c.flowChannelId,
  fromAngleChannelId: c.fromAngleChannelId,
  toAngleChannelId: c.toAngleChannelId,
});

export function toLatestEstimate(e: EstimateRow, t: TrackRow): LatestEstimate {
  return {
    id: e.id,
    at: iso(e.at),
    frequencyHz: e.frequencyHz,
    dampingPercent: e.dampingPercent,
    dampingLo: e.dampingLo,
    dampingHi: e.dampingHi,
    forced: e.forced,
    method: e.method,
    band: bandOf(e.dampingPercent, t, e.forced),
  };
}

export function toTrack(t: TrackRow, latest: EstimateRow | undefined): Track {
  return {
    id: t.id,
    code: t.code,
    name: t.name,
    description: t.description,
    minHz: t.minHz,
    maxHz: t.maxHz,
    poorBelow: t.poorBelow,
    lowBelow: t.lowBelow,
    corridorId: t.corridorId,
    reference: { groupA: [...t.reference.groupA], groupB: [...t.reference.groupB] },
    latestEstimate: latest ? toLatestEstimate(latest, t) : null,
  };
}
