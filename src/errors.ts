/** A mistake in what the user gave rungs: the message names the file or study, the field and what would be valid.
 *  The CLI prints it as one line and exits with status 2; other studies of the run still finish. */
export class RungsInputError extends Error {
  constructor(message: string, public readonly where?: string) {
    super(message);
    this.name = 'RungsInputError';
  }
}

/** A numerical failure the user must hear about (non-convergence, non-finite values): names where it happened. */
export class RungsNumericalError extends Error {
  constructor(message: string, public readonly where?: string) {
    super(message);
    this.name = 'RungsNumericalError';
  }
}
