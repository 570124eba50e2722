// CSV uploads (DESIGN.md §5.5): a header row naming a time column and one column per channel,
// then one row per PMU frame. The time is epoch seconds or ISO-8601 with a UTC designator; all
// rows of a file use the same form. Values are plain decimals; an empty cell is a dropout.
import fs from 'node:fs';
import { csvRecords, type CsvStream } from './csv-stream';
import { checkTextEncoding, hasInvalidUtf8 } from './encoding';
import { FileRefusedError } from './errors';
import type { IngestSource, SourceColumn, SourceRow } from './source';
import { numberProblem, parseCell, parseTimeCell, quote, type TimeFormat } from './text-values';

/** Accepted names of the time column (compared case-insensitively). */
export const TIME_COLUMN_NAMES = ['time', 'timestamp', 'utc', 'epoch', 'time_utc', 'datetime'] as const;

const where = (line: number) => `line ${line}`;

export async function openCsvSource(path: string): Promise<IngestSource> {
  const { size } = await fs.promises.stat(path);
  if (size === 0) throw new FileRefusedError('line 1', 'the file is empty');
  await checkTextEncoding(path, '');

  const file = fs.createReadStream(path, { highWaterMark: 256 * 1024 });
  const csv: CsvStream = csvRecords(file, { where });
  let ok = false;
  try {
    const first = await csv.records.next();
    if (first.done) throw new FileRefusedError('line 1', 'the file holds no rows (only blank lines)');
    const header = first.value;
    const { timeIndex, columns } = readHeader(header.fields, header.line);
    ok = true;
    return {
      format: 'csv',
      recordFormat: 'csv',
      columns,
      headerWhere: where(header.line),
      where,
      totalBytes: size,
      bytesRead: () => file.bytesRead,
      close: () => csv.destroy(),
      rows: (select) => csvRows(csv, header.line, header.fields.length, timeIndex, columns, select),
    };
  } finally {
    if (!ok) csv.destroy();
  }
}

function readHeader(fields: string[], line: number): { timeIndex: number; columns: SourceColumn[] } {
  const loc = where(line);
  for (let i = 0; i < fields.length; i++) {
    if (hasInvalidUtf8(fields[i])) {
      throw new FileRefusedError(
        loc,
        `column ${i + 1} name ${quote(fields[i])} holds bytes that are not UTF-8 (a Latin-1 or Windows-1252 file?); save the file as UTF-8`,
      );
    }
  }
  const lower = fields.map((f) => f.toLowerCase());
  const timeIdx = lower.flatMap((f, i) => ((TIME_COLUMN_NAMES as readonly string[]).includes(f) ? [i] : []));
  if (timeIdx.length === 0) {
    if (typeof parseTimeCell(fields[0]) !== 'string') {
      throw new FileRefusedError(
        loc,
        `the first row is data (${quote(fields[0])} reads as a time), not a header; the first row must name the columns, with one named 'time'`,
      );
    }
    let hint = '';
    if (fields.length === 1 && /[;\t|]/.test(fields[0])) {
      hint = '; the header has a single column: Keel reads comma-separated files, not semicolons or tabs';
    }
    throw new FileRefusedError(
      loc,
      `no time column: one column must be named ${TIME_COLUMN_NAMES.map((n) => `'${n}'`).join(', ').replace(/, ([^,]*)$/, ' or $1')}${hint}`,
    );
  }
  if (timeIdx.length > 1) {
    throw new FileRefusedError(
      loc,
      `more than one time column (${timeIdx.map((i) => quote(fields[i])).join(' and ')}); keep one`,
    );
  }
  const seen = new Map<string, number>();
  const columns: SourceColumn[] = [];
  for (let i = 0; i < fields.length; i++) {
    if (i === timeIdx[0]) continue;
    const name = fields[i];
    if (name === '') throw new FileRefusedError(loc, `column ${i + 1} has no name`);
    const prev = seen.get(name);
    if (prev !== undefined) {
      throw new FileRefusedError(loc, `column name ${quote(name)} appears twice (columns ${prev + 1} and ${i + 1})`);
    }
    seen.set(name, i);
    columns.push({ name });
  }
  if (columns.length === 0) throw new FileRefusedError(loc, 'the header names only the time column, no channel columns');
  return { timeIndex: timeIdx[0], columns };
}

async function* csvRows(
  csv: CsvStream,
  headerLine: number,
  fieldCount: number,
  timeIndex: number,
  columns: SourceColumn[],
  select: number[],
): AsyncGenerator<SourceRow> {
  // Column j of `columns` is field j of the row when it comes before the time column, j+1 after.
  const fieldOf = select.map((j) => (j < timeIndex ? j : j + 1));
  const names = select.map((j) => columns[j].name);
  let format: TimeFormat | undefined;
  let formatLine = 0;
  let any = false;
  try {
    for (;;) {
      const r = await csv.records.next();
      if (r.done) break;
      const { line, fields } = r.value;
      if (fields.length !== fieldCount) {
        throw new FileRefusedError(
          where(line),
          `${fields.length} ${fields.length === 1 ? 'field' : 'fields'}, but the header (line ${headerLine}) has ${fieldCount}` +
            (fields.length < fieldCount ? ' (a truncated row?)' : ''),
        );
      }
      const timeText = fields[timeIndex];
      const pt = parseTimeCell(timeText);
      if (typeof pt === 'string' && (TIME_COLUMN_NAMES as readonly string[]).includes(timeText.replace(/^\uFEFF/, '').toLowerCase())) {
        throw new FileRefusedError(where(line), 'a second header row in the middle of the data (two files pasted together?)');
      }
      if (typeof pt === 'string') throw new FileRefusedError(where(line), pt);
      if (format === undefined) {
        format = pt.format;
        formatLine = line;
      } else if (pt.format !== format) {
        throw new FileRefusedError(
          where(line),
          `time ${quote(timeText)} is ${pt.format === 'iso' ? 'an ISO-8601 time' : 'in epoch seconds'}, but line ${formatLine} gives ${format === 'iso' ? 'ISO-8601 times' : 'epoch seconds'}; use one form throughout`,
        );
      }
      const values = new Float64Array(fieldOf.length);
      for (let k = 0; k < fieldOf.length; k++) {
        const cell = fields[fieldOf[k]];
        const v = parseCell(cell);
        if (v === undefined) throw new FileRefusedError(where(line), `column ${quote(names[k])}: ${numberProblem(cell)}`);
        values[k] = v;
      }
      any = true;
      yield { line, time: pt.t, timeText, values };
    }
    if (!any) {
      throw new FileRefusedError(where(headerLine), 'the file holds only the header row, no data rows');
    }
  } finally {
    csv.destroy();
  }
}
