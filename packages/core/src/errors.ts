/**
 * An error in what the user gave (a design file, an option, an API argument).
 * Its message is one line that names the field, the bad value and the fix; the CLI prints it
 * without a stack trace and exits with code 2. Anything that is not an InputError is a bug.
 */
export class InputError extends Error {
  /** Dotted path of the offending field, e.g. `input.w` or `--samples`. */
  readonly field: string;

  constructor(field: string, message: string) {
    super(field === '' ? message : `${field}: ${message}`);
    this.name = 'InputError';
    this.field = field;
  }
}

/** True when `e` is the project's own input error (also across realms, by name). */
export function isInputError(e: unknown): e is InputError {
  return e instanceof InputError || (e instanceof Error && e.name === 'InputError' && 'field' in e);
}
