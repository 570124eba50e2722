// A refusal of a PMU file by a parser. It is a ModalInputError (code 'MODAL_INPUT'), so every
// caller that maps estimator input errors to a 400 / an unrecoverable job failure / a non-zero CLI
// exit handles bad files the same way; `line` (1-based, in the file named by `file`) and `format`
// say where. Messages start with the location, e.g. `line 17: …` or `cfg line 3: …`.
import { ModalInputError } from '../errors';

export type FileFormat = 'csv' | 'comtrade';

export class FormatError extends ModalInputError {
  constructor(
    message: string,
    readonly format: FileFormat,
    readonly line: number | null = null,
  ) {
    super(message);
    this.name = 'FormatError';
  }
}
