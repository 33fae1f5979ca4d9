/**
 * What a command may touch of the outside world, passed in so the CLI can be
 * driven by tests without a terminal or a real process.
 *
 * @module
 */
import type { Readable } from 'node:stream';

/** A text sink such as process.stdout. */
export interface TextSink {
  write(text: string): unknown;
  /** True when the sink is a terminal. */
  readonly isTTY?: boolean;
  /** Terminal width when it is one. */
  readonly columns?: number;
}

/** The outside world of one CLI invocation. */
export interface CliIo {
  readonly stdout: TextSink;
  readonly stderr: TextSink;
  readonly stdin?: Readable;
  readonly cwd: string;
  readonly env: Readonly<Record<string, string | undefined>>;
  /** Milliseconds since some fixed point; defaults to performance.now(). */
  readonly now?: () => number;
}
