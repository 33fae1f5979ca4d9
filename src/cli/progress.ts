/**
 * Progress bars on stderr for long stages: only when stderr is a terminal and
 * the user did not ask for quiet, and only for a stage that has run longer
 * than a second (shorter ones never flash a bar). stdout carries data only.
 *
 * A bar hides the cursor and turns line wrap off while it is drawn; every
 * live bar is listed here, so {@link restoreTerminal} can put the terminal
 * back (cursor shown, wrap on) when the run ends early: on SIGINT/SIGTERM
 * (`signals.ts`) and on an error (`program.ts`).
 *
 * @module
 */
import cliProgress from 'cli-progress';
import type { CliIo } from './io.js';

/** Receives stage progress; `done()` clears whatever is on screen. */
export interface ProgressReporter {
  update(stage: string, done: number, total: number): void;
  done(): void;
}

/** Shows the cursor again (DECTCEM set; common practice in terminals since the VT220). */
export const SHOW_CURSOR = '\x1b[?25h';
/** Turns automatic line wrap back on (DECAWM set). */
export const WRAP_ON = '\x1b[?7h';

/** How long a stage runs before its bar is drawn, in milliseconds. */
export const PROGRESS_DELAY_MS = 1000;

interface LiveBar {
  readonly bar: cliProgress.SingleBar;
  readonly stream: NodeJS.WritableStream;
}

/** Bars drawn now, in any reporter of this process. */
const live = new Set<LiveBar>();

/**
 * Stops every bar still drawn and puts the terminal back: the bar's line
 * cleared, the cursor shown and line wrap on (written even when the bar's
 * own stop wrote them, so the last state on the terminal is always the
 * restored one). Safe to call at any time, any number of times.
 */
export function restoreTerminal(): void {
  for (const l of [...live]) {
    live.delete(l);
    try {
      l.bar.stop();
    } finally {
      l.stream.write(`\r\x1b[K${SHOW_CURSOR}${WRAP_ON}`);
    }
  }
}

/** True when bars are drawn: stderr is a terminal, no `--quiet`, and not under CI. */
export function progressShown(io: CliIo, quiet: boolean): boolean {
  return !quiet && io.stderr.isTTY === true && !io.env.CI;
}

/** A reporter that draws one bar per stage, or does nothing when bars are off. */
export function progressReporter(io: CliIo, quiet: boolean): ProgressReporter {
  const stream = io.stderr as unknown as NodeJS.WriteStream;
  if (!progressShown(io, quiet)) return { update() {}, done() {} };
  const now = io.now ?? (() => performance.now());
  let drawn: LiveBar | null = null;
  let current = '';
  let since = 0;
  const stop = (): void => {
    if (drawn === null) return;
    live.delete(drawn);
    drawn.bar.stop();
    drawn = null;
  };
  return {
    update(stage, done, total) {
      if (stage !== current) {
        stop();
        current = stage;
        since = now();
      }
      if (drawn === null) {
        if (now() - since < PROGRESS_DELAY_MS || done >= total) return;
        const bar = new cliProgress.SingleBar(
          { stream, format: `${stage.padEnd(11)} {bar} {percentage}% | {value}/{total}`, hideCursor: true, clearOnComplete: true },
          cliProgress.Presets.shades_classic,
        );
        drawn = { bar, stream };
        live.add(drawn);
        bar.start(total, done);
      } else {
        drawn.bar.setTotal(total);
        drawn.bar.update(done);
      }
    },
    done() {
      stop();
      current = '';
    },
  };
}
