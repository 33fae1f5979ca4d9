/**
 * Progress bars on stderr for long stages: only when stderr is a terminal and
 * the user did not ask for quiet.
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

/** A reporter that draws one bar per stage, or does nothing when bars are off. */
export function progressReporter(io: CliIo, quiet: boolean): ProgressReporter {
  const stream = io.stderr as unknown as NodeJS.WriteStream;
  if (quiet || !io.stderr.isTTY || io.env.CI) return { update() {}, done() {} };
  let bar: cliProgress.SingleBar | null = null;
  let current = '';
  const stop = (): void => {
    bar?.stop();
    bar = null;
  };
  return {
    update(stage, done, total) {
      if (stage !== current) {
        stop();
        current = stage;
        bar = new cliProgress.SingleBar(
          { stream, format: `${stage.padEnd(10)} {bar} {percentage}% | {value}/{total}`, hideCursor: true, clearOnComplete: true },
          cliProgress.Presets.shades_classic,
        );
        bar.start(total, done);
      } else {
        bar?.update(done);
      }
    },
    done: stop,
  };
}
