import { View } from 'react-native';
import type { Area, Channel, Corridor, NetworkResponse, Pmu, Site, Track } from '@/shared/api/network';
import { bands } from '../theme';
import { type Column } from '../data-table';
import { formatHzRange, formatKv, formatPercent, formatRate } from '../format';
import { Text } from '../text';
import type { NetworkKind } from './kinds';

type Model = NetworkResponse;

export type NetworkRow = Area | Site | Pmu | Channel | Corridor | Track;

/** Names instead of ids in lists: a lookup per referenced kind. */
export function lookups(m: Model) {
  const byId = <T extends { id: number }>(rows: T[]) => new Map(rows.map((r) => [r.id, r]));
  return {
    area: byId(m.areas),
    site: byId(m.sites),
    pmu: byId(m.pmus),
    channel: byId(m.channels),
    corridor: byId(m.corridors),
  };
}

/** Rows of one kind, sorted by what a person scans for (name, or channel name). */
export function rowsOf(kind: NetworkKind, m: Model): NetworkRow[] {
  const byName = <T extends { name: string }>(rows: T[]) => [...rows].sort((a, b) => a.name.localeCompare(b.name));
  switch (kind) {
    case 'areas':
      return byName(m.areas);
    case 'sites':
      return byName(m.sites);
    case 'pmus':
      return byName(m.pmus);
    case 'channels':
      return byName(m.channels);
    case 'corridors':
      return byName(m.corridors);
    case 'tracks':
      return [...m.tracks].sort((a, b) => a.minHz - b.minHz);
  }
}

/** The name a row is called by in labels ("Edit site Moorgate"). */
export function rowName(row: NetworkRow): string {
  return row.name;
}

function ThresholdText({ t }: { t: Track }) {
  return (
    <View>
      <Text variant="small" mono>
        <Text aria-hidden variant="small" color={bands.poor.color}>{bands.poor.shape}</Text> poor {'<'} {formatPercent(t.poorBelow)}
      </Text>
      <Text variant="small" mono>
        <Text aria-hidden variant="small" color={bands.low.color}>{bands.low.shape}</Text> low {'<'} {formatPercent(t.lowBelow)}
      </Text>
    </View>
  );
}

export function columnsOf(kind: NetworkKind, m: Model): Column<NetworkRow>[] {
  const L = lookups(m);
  const siteName = (id: number | null) => (id == null ? '—' : (L.site.get(id)?.name ?? `#${id}`));
  const channelName = (id: number | null) => (id == null ? '—' : (L.channel.get(id)?.name ?? `#${id}`));
  switch (kind) {
    case 'areas':
      return [
        { key: 'name', title: 'Name', render: (r) => (r as Area).name, flex: 1.2 },
        { key: 'code', title: 'Code', render: (r) => (r as Area).code, mono: true },
        { key: 'desc', title: 'Description', render: (r) => (r as Area).description, flex: 2 },
        { key: 'sites', title: 'Sites', render: (r) => String(m.sites.filter((s) => s.areaId === r.id).length), mono: true, flex: 0.5 },
      ];
    case 'sites':
      return [
        { key: 'name', title: 'Name', render: (r) => (r as Site).name, flex: 1.2 },
        { key: 'code', title: 'Code', render: (r) => (r as Site).code, mono: true, flex: 1.2 },
        { key: 'area', title: 'Area', render: (r) => L.area.get((r as Site).areaId)?.name ?? '—' },
        { key: 'kv', title: 'Voltage', render: (r) => formatKv((r as Site).kV), mono: true, flex: 0.7 },
        { key: 'xy', title: 'Schematic x, y', render: (r) => `${(r as Site).x}, ${(r as Site).y}`, mono: true, flex: 0.8 },
      ];
    case 'pmus':
      return [
        { key: 'name', title: 'Name', render: (r) => (r as Pmu).name, flex: 1.2 },
        { key: 'code', title: 'Code', render: (r) => (r as Pmu).code, mono: true, flex: 1.3 },
        { key: 'site', title: 'Site', render: (r) => siteName((r as Pmu).siteId) },
        { key: 'rate', title: 'Reporting rate', render: (r) => formatRate((r as Pmu).reportingRate), mono: true },
        { key: 'desc', title: 'Description', render: (r) => (r as Pmu).description, flex: 1.5 },
      ];
    case 'channels':
      return [
        { key: 'name', title: 'Name', render: (r) => (r as Channel).name, mono: true, flex: 1.5 },
        { key: 'site', title: 'Site', render: (r) => siteName((r as Channel).siteId) },
        { key: 'pmu', title: 'PMU', render: (r) => { const id = (r as Channel).pmuId; return id == null ? '—' : (L.pmu.get(id)?.name ?? `#${id}`); } },
        { key: 'kind', title: 'Kind', render: (r) => (r as Channel).kind, flex: 0.7 },
        { key: 'unit', title: 'Unit', render: (r) => (r as Channel).unit, mono: true, flex: 0.5 },
        { key: 'desc', title: 'Description', render: (r) => (r as Channel).description, flex: 1.8 },
      ];
    case 'corridors':
      return [
        { key: 'name', title: 'Name', render: (r) => (r as Corridor).name, flex: 1.2 },
        { key: 'code', title: 'Code', render: (r) => (r as Corridor).code, mono: true, flex: 1.2 },
        { key: 'ends', title: 'From → to', render: (r) => `${siteName((r as Corridor).fromSiteId)} → ${siteName((r as Corridor).toSiteId)}`, flex: 1.6 },
        { key: 'kv', title: 'Voltage', render: (r) => formatKv((r as Corridor).kV), mono: true, flex: 0.7 },
        { key: 'flow', title: 'Flow channel', render: (r) => channelName((r as Corridor).flowChannelId), mono: true, flex: 1.2 },
        {
          key: 'angles',
          title: 'Angle channels',
          render: (r) => `${channelName((r as Corridor).fromAngleChannelId)} / ${channelName((r as Corridor).toAngleChannelId)}`,
          mono: true,
          flex: 2,
        },
      ];
    case 'tracks':
      return [
        { key: 'name', title: 'Name', render: (r) => (r as Track).name, flex: 1.1 },
        { key: 'code', title: 'Code', render: (r) => (r as Track).code, mono: true },
        { key: 'range', title: 'Frequency range', render: (r) => formatHzRange((r as Track).minHz, (r as Track).maxHz), mono: true, flex: 1.3 },
        { key: 'bands', title: 'Damping bands', render: (r) => <ThresholdText t={r as Track} />, flex: 1.4 },
        { key: 'corridor', title: 'Corridor', render: (r) => { const id = (r as Track).corridorId; return id == null ? '—' : (L.corridor.get(id)?.name ?? `#${id}`); } },
        {
          key: 'groups',
          title: 'Swing groups',
          render: (r) => {
            const t = r as Track;
            const names = (codes: string[]) => codes.map((c) => m.sites.find((s) => s.code === c)?.name ?? c).join(', ') || '—';
            return `${names(t.reference.groupA)} vs ${names(t.reference.groupB)}`;
          },
          flex: 2,
        },
      ];
  }
}
