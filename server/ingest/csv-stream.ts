// The one CSV tokenizer of the ingest path: csv-parse's streaming API (npm csv-parse), fed by a
// file stream, yielding one record at a time with the line on which it ends. Used for CSV uploads
// and for the ASCII .dat of COMTRADE (whose rows are comma-separated too).
import { CsvError, parse, type InfoRecord, type Options } from 'csv-parse';
import { pipeline, type Readable } from 'node:stream';
import { FileRefusedError } from './errors';

/** A row longer than this is refused (a file without line breaks would otherwise fill memory). */
export const MAX_ROW_BYTES = 1 << 20;

export interface CsvRecord {
  /** Line on which the record ends, counted in the stream fed to the parser, 1-based. */
  line: number;
  fields: string[];
}

export interface CsvStream {
  records: AsyncIterator<CsvRecord>;
  destroy(): void;
}

/**
 * Tokenizes `input` with csv-parse. `lineOffset` is added to csv-parse's line numbers (for a
 * .dat section embedded in a .cff after its header lines). `where(line)` formats locations.
 */
export function csvRecords(input: Readable, opts: { lineOffset?: number; where: (line: number) => string }): CsvStream {
  const lineOffset = opts.lineOffset ?? 0;
  // The parser runs ahead of the consumer (its readable side buffers records), and a stream that
  // errors drops what it buffered. So parse errors do not error the stream: csv-parse skips the
  // bad record and reports it (skip_records_with_error, on_skip), and the error is thrown when the
  // consumer reaches its place — after every earlier record has been checked, so that the first
  // fault in the file is the one reported.
  let produced = 0; // records the parser has emitted
  let producedLine = 0; // csv-parse's line of the last emitted record
  const pending: { after: number; lastLine: number; err: unknown }[] = [];
  const options: Options<CsvRecord, string[]> = {
    bom: true,
    relax_column_count: true,
    skip_empty_lines: true,
    trim: true,
    max_record_size: MAX_ROW_BYTES,
    skip_records_with_error: true,
    on_skip: (err: CsvError | undefined) => {
      pending.push({ after: produced, lastLine: producedLine, err });
      return undefined;
    },
    on_record: (fields: unknown, info: InfoRecord) => {
      produced++;
      producedLine = info.lines;
      return { line: info.lines + lineOffset, fields: fields as string[] };
    },
  };
  // The typings tie on_record to the overload with `columns`; the option works without it.
  const parser = parse(options as unknown as Options);
  // pipeline() forwards a read error of the file to the parser, so the loop below sees it.
  pipeline(input, parser, () => undefined);
  const it = parser[Symbol.asyncIterator]() as AsyncIterator<CsvRecord>;
  let consumed = 0;
  const failIfDue = (atEnd: boolean) => {
    const p = pending[0];
    if (p && (atEnd || p.after <= consumed)) throw translateCsvError(p.err, lineOffset, p.lastLine, opts.where);
  };
  const records: AsyncIterator<CsvRecord> = {
    async next() {
      failIfDue(false);
      const r = await it.next();
      if (r.done) {
        failIfDue(true);
        return { done: true, value: undefined };
      }
      failIfDue(false); // an error found while this call waited, placed before this record
      consumed++;
      return r;
    },
  };
  return {
    records,
    destroy() {
      input.destroy();
      parser.destroy();
    },
  };
}

function translateCsvError(err: unknown, lineOffset: number, lastLine: number, where: (line: number) => string): Error {
  const e = err as Partial<CsvError> & { lines?: number };
  // csv-parse's codes mostly start with CSV_, but not all (INVALID_OPENING_QUOTE): any CsvError
  // is a fault of the file, never of the server.
  if (!e || typeof e.code !== 'string' || !(err instanceof CsvError || e.code.startsWith('CSV_'))) return err as Error;
  const line = (e.lines ?? 0) + lineOffset;
  const loc = where(Math.max(1, line));
  switch (e.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      // csv-parse reports the end of the file; the quote was opened in the row after the last
      // complete one (blank lines aside), which is where a person has to look.
      return new FileRefusedError(
        where(lastLine + 1 + lineOffset),
        'a quoted field opened in this row is never closed (the file may be truncated)',
      );
    case 'CSV_INVALID_CLOSING_QUOTE':
    case 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE':
      return new FileRefusedError(loc, 'a closing quote is followed by other characters instead of a comma');
    case 'INVALID_OPENING_QUOTE':
      return new FileRefusedError(loc, 'a quote in the middle of a field (quote the whole field, or remove the quote)');
    case 'CSV_MAX_RECORD_SIZE':
      return new FileRefusedError(
        loc,
        `a row longer than ${MAX_ROW_BYTES / 1024} KiB (the file has no line breaks, or is not a CSV file)`,
      );
    default:
      return new FileRefusedError(loc, `unreadable CSV: ${String(e.message).replace(/ at line \d+.*$/, '')}`);
  }
}
