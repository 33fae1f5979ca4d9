/**
 * The one error type that means "the user asked for something unusable".
 * The CLI turns it into a single line on stderr and exit code 2; any other
 * error is a failure while running (exit code 1).
 *
 * @module
 */

/**
 * Bad usage or unusable input. The message is one line that names the bad
 * value and what is allowed. `option`, when set, is the library option's
 * camelCase name (`minDf`); the CLI shows it as its flag (`--min-df`).
 */
export class UsageError extends Error {
  override readonly name = 'UsageError';
  readonly option: string | undefined;
  constructor(message: string, option?: string) {
    super(message);
    this.option = option;
  }
}

/** Formats a value for an error message: strings quoted, others as JSON. */
export function show(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value);
  if (typeof value === 'number' || typeof value === 'boolean' || value === null) return String(value);
  if (value === undefined) return 'nothing';
  try {
    return JSON.stringify(value) ?? String(value);
  } catch {
    return String(value);
  }
}
