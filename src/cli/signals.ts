/**
 * SIGINT/SIGTERM at the CLI edge: put the terminal back (a progress bar hides
 * the cursor and turns line wrap off), remove the staging folders a run has
 * in flight (they may hold partial outputs with personal data), then exit
 * with 128 + the signal number.
 *
 * @module
 */
import { removeLiveStagingSync } from '../report/folder.js';
import { restoreTerminal } from './progress.js';

/** The part of `process` the handlers need (an EventEmitter in tests). */
export interface SignalSource {
  once(signal: 'SIGINT' | 'SIGTERM', listener: () => void): unknown;
}

/** Exit codes after a signal: 128 + its number (common practice in shells). */
export const SIGNAL_EXIT = Object.freeze({ SIGINT: 130, SIGTERM: 143 });

/**
 * Installs one-shot SIGINT and SIGTERM handlers on `source` that remove the
 * live staging folders, write one line to `stderr` and call `exit` with
 * {@link SIGNAL_EXIT}.
 */
export function installStagingCleanup(source: SignalSource, stderr: { write(s: string): unknown }, exit: (code: number) => void): void {
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    source.once(signal, () => {
      restoreTerminal(); // a bar hides the cursor and turns line wrap off
      const removed = removeLiveStagingSync();
      stderr.write(`sheaf: stopped by ${signal}${removed.length ? '; the unfinished output was removed' : ''}\n`);
      exit(SIGNAL_EXIT[signal]);
    });
  }
}
