// The six kinds of network records and how the Network screen names them. `key` is also the URL
// segment (/network/sites, /network/sites/12, /network/sites/new).
export const NETWORK_KINDS = [
  { key: 'areas', title: 'Areas', singular: 'area' },
  { key: 'sites', title: 'Sites', singular: 'site' },
  { key: 'pmus', title: 'PMUs', singular: 'PMU' },
  { key: 'channels', title: 'Channels', singular: 'channel' },
  { key: 'corridors', title: 'Corridors', singular: 'corridor' },
  { key: 'tracks', title: 'Mode tracks', singular: 'mode track' },
] as const;

export type NetworkKind = (typeof NETWORK_KINDS)[number]['key'];
export type NetworkKindInfo = (typeof NETWORK_KINDS)[number];

export function kindInfo(key: string | undefined): NetworkKindInfo | undefined {
  return NETWORK_KINDS.find((k) => k.key === key);
}

/** "New area", "New PMU", "New mode track". */
export function newTitle(k: NetworkKindInfo): string {
  return `New ${k.singular}`;
}
