// Refusals of uploaded files. Every refusal names where in the file the problem is (a line of a
// text file, a record of a binary COMTRADE .dat) and the reason, so that a person can open the
// file and fix it. The route maps `code` to the HTTP answer; the ingest job turns a refusal into
// an unrecoverable job failure with the same message.

/** The file itself is malformed or breaks a rule of §5.5 (rows, times, rate, numbers, encoding). */
export class FileRefusedError extends Error {
  readonly code = 'BAD_FILE' as const;
  /** e.g. "line 17", "event.dat record 12 (byte 264)"; '' when the problem is the file as a whole. */
  readonly where: string;
  readonly reason: string;
  constructor(where: string, reason: string) {
    super(where ? `${where}: ${reason}` : reason);
    this.name = 'FileRefusedError';
    this.where = where;
    this.reason = reason;
  }
}

/** Columns that match no channel of the network and that the upload's `mapping` does not cover. */
export class UnmappedColumnsError extends Error {
  readonly code = 'UNMAPPED_COLUMNS' as const;
  constructor(
    readonly columns: string[],
    readonly knownChannels: string[],
    readonly where = '',
  ) {
    super(
      `${where ? `${where}: ` : ''}${columns.length === 1 ? 'column' : 'columns'} ${columns.map((c) => `"${c}"`).join(', ')} ` +
        `${columns.length === 1 ? 'matches' : 'match'} no channel of the network; ` +
        `re-send the upload with a mapping {column → channel name or "ignore"}`,
    );
    this.name = 'UnmappedColumnsError';
  }
}

/** The `mapping` field of the upload is inconsistent with the file or the network. */
export class MappingError extends Error {
  readonly code = 'BAD_MAPPING' as const;
  constructor(message: string) {
    super(message);
    this.name = 'MappingError';
  }
}

/** Same content (sha256) as a recording already stored. */
export class DuplicateRecordingError extends Error {
  readonly code = 'DUPLICATE' as const;
  constructor(
    readonly existing: { id: number; fileName: string },
    readonly checksum: string,
  ) {
    super(`This file was already uploaded as recording ${existing.id} ("${existing.fileName}")`);
    this.name = 'DuplicateRecordingError';
  }
}

export type IngestError = FileRefusedError | UnmappedColumnsError | MappingError | DuplicateRecordingError;

export function isIngestError(err: unknown): err is IngestError {
  return (
    err instanceof FileRefusedError ||
    err instanceof UnmappedColumnsError ||
    err instanceof MappingError ||
    err instanceof DuplicateRecordingError
  );
}
