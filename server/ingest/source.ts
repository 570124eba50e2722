// What every file reader (CSV, COMTRADE .cfg + .dat, .cff) hands to the ingest pipeline: the
// data columns found in the file's header, what the file declares about its rate, and a stream
// of rows read on demand. Readers never hold the data part of a file in memory.

export type SourceFormat = 'csv' | 'comtrade' | 'cff';

export interface SourceColumn {
  /** Column name as written in the file (CSV header cell, COMTRADE analog ch_id). */
  name: string;
  /** Unit declared by the file (COMTRADE `uu`), if any. */
  unit?: string;
}

export interface SourceRow {
  /** Line number (text files) or record number (binary .dat), 1-based, for messages. */
  line: number;
  /** Epoch seconds, UTC. */
  time: number;
  /** The time as written in the file (for messages); '' for binary records. */
  timeText: string;
  /** Values of the selected columns, in the order of the `select` list; NaN = dropout. */
  values: Float64Array;
}

export interface DeclaredRate {
  /** Samples per second from the file's own metadata (COMTRADE `samp`). */
  rate: number;
  /** Where it is declared, for messages ("event.cfg line 8"). */
  where: string;
  /** Last sample number announced (COMTRADE `endsamp`), checked against the data. */
  lastSample?: number;
}

export interface IngestSource {
  format: SourceFormat;
  /** How the recording is filed: CSV, or COMTRADE with ASCII or binary data. */
  recordFormat: 'csv' | 'comtrade-ascii' | 'comtrade-binary';
  /** The data columns (the time column and COMTRADE digital channels are not listed). */
  columns: SourceColumn[];
  /** Rate declared by the file; undefined when it must be measured from the timestamps. */
  declaredRate?: DeclaredRate;
  /** Nominal system frequency declared by the file (COMTRADE `lf`), Hz. */
  nominalHz?: number;
  /** Where the column names are, for messages about them ("line 1", "event.cfg line 3"). */
  headerWhere: string;
  /** Human-readable location of a row's line/record number ("line 17", "x.dat record 3 (byte 48)"). */
  where(line: number): string;
  /**
   * Reads the data rows; values are produced for the columns listed in `select` (indexes into
   * `columns`), in that order; columns not selected are skipped without checks. Call once.
   */
  rows(select: number[]): AsyncIterable<SourceRow>;
  /** Bytes of the file(s) consumed so far, and in total: progress = bytesRead / totalBytes. */
  bytesRead(): number;
  totalBytes: number;
  /** Releases open files (after an error or an early stop). */
  close(): void;
}
