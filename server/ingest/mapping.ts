// Mapping a file's columns to channels of the network. A column whose name is a channel name
// (exactly, or differing only in letter case) maps by itself; the upload's `mapping` field
// {column → channel name | "ignore"} covers the rest and may override a match. Anything left
// over is refused as UNMAPPED_COLUMNS so that the client can ask the person and re-send.
import { MappingError, UnmappedColumnsError } from './errors';
import type { SourceColumn } from './source';

export const IGNORE = 'ignore';

export interface NetworkChannel {
  id: number;
  name: string;
}

export interface ColumnMapping {
  /** Index into the source's columns. */
  column: number;
  columnName: string;
  channel: NetworkChannel;
}

export function mapColumns(
  columns: SourceColumn[],
  channels: NetworkChannel[],
  mapping: Record<string, string> = {},
  where = '',
): ColumnMapping[] {
  const names = new Set(columns.map((c) => c.name));
  const byName = new Map(channels.map((c) => [c.name, c]));
  const byLower = new Map(channels.map((c) => [c.name.toLowerCase(), c]));
  for (const [col, target] of Object.entries(mapping)) {
    if (!names.has(col)) {
      throw new MappingError(
        `mapping names column "${col}", which is not in the file (its columns: ${columns.map((c) => `"${c.name}"`).join(', ')})`,
      );
    }
    if (target !== IGNORE && !byName.has(target)) {
      throw new MappingError(`mapping sends column "${col}" to "${target}", which is not a channel of the network`);
    }
  }
  const out: ColumnMapping[] = [];
  const unmapped: string[] = [];
  const taken = new Map<number, string>();
  columns.forEach((c, column) => {
    let channel: NetworkChannel | undefined;
    const target = Object.prototype.hasOwnProperty.call(mapping, c.name) ? mapping[c.name] : undefined;
    if (target === IGNORE) return;
    if (target !== undefined) channel = byName.get(target);
    else channel = byName.get(c.name.trim()) ?? byLower.get(c.name.trim().toLowerCase());
    if (!channel) {
      unmapped.push(c.name);
      return;
    }
    const other = taken.get(channel.id);
    if (other !== undefined) {
      throw new MappingError(`columns "${other}" and "${c.name}" both go to channel "${channel.name}"; map one of them elsewhere or to "ignore"`);
    }
    taken.set(channel.id, c.name);
    out.push({ column, columnName: c.name, channel });
  });
  if (unmapped.length > 0) {
    throw new UnmappedColumnsError(unmapped, channels.map((c) => c.name).sort(), where);
  }
  if (out.length === 0) throw new MappingError('every column is mapped to "ignore"; there is nothing to store');
  return out;
}
