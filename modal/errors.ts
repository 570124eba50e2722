// Every refusal of bad input by an estimator is a ModalInputError whose message names what is
// wrong precisely (tests compare messages verbatim). Callers map `code` to a 400 / an
// UnrecoverableError / a non-zero CLI exit.
export class ModalInputError extends Error {
  readonly code = 'MODAL_INPUT' as const;
  constructor(message: string) {
    super(message);
    this.name = 'ModalInputError';
  }
}
