/**
 * The one error type that means "the user asked for something unusable".
 * The CLI turns it into a single line on stderr and exit code 2; any other
 * error is a failure while running (exit code 1).
 *
 * @module
 */

/** Bad usage or unusable input: a one-line message naming the bad value and what is allowed. */
export class UsageError extends Error {
  override readonly name = 'UsageError';
  constructor(message: string) {
    super(message);
  }
}
