/**
 * Reading progress in bytes: the total of the files about to be read (one
 * `stat` each, done only when someone listens) and a running count as their
 * bytes come in. Standard input and pipes have no size known ahead: their
 * bytes are counted and the total grows with them.
 *
 * @module
 */
import { stat } from 'node:fs/promises';

/** Receives bytes read so far and the bytes expected in all. */
export type ReadProgress = (doneBytes: number, totalBytes: number) => void;

/** Counts bytes as they are read and passes the running total on. */
export interface ByteMeter {
  /** Adds `bytes` just read. */
  add(bytes: number): void;
}

/** Files sized at once while the total is worked out. */
const STAT_CONCURRENCY = 32;

/**
 * A meter over the files `paths` (absolute): sizes them, reports 0 of the
 * total at once, then reports on every {@link ByteMeter.add}. A file that
 * cannot be sized counts 0 (reading it reports the error).
 */
export async function byteMeter(paths: readonly string[], report: ReadProgress): Promise<ByteMeter> {
  let total = 0;
  let next = 0;
  const worker = async (): Promise<void> => {
    while (next < paths.length) {
      const p = paths[next++] as string;
      try {
        const st = await stat(p);
        if (st.isFile()) total += st.size;
      } catch {
        // sized as 0; reading reports it
      }
    }
  };
  await Promise.all(Array.from({ length: Math.min(STAT_CONCURRENCY, paths.length) }, worker));
  let done = 0;
  report(0, total);
  return {
    add(bytes) {
      done += bytes;
      if (done > total) total = done;
      report(done, total);
    },
  };
}

/** Passes chunks through, adding each one's bytes to `meter`. */
export async function* metered<T extends Uint8Array | string>(source: AsyncIterable<T>, meter: ByteMeter | null): AsyncGenerator<T, void, undefined> {
  for await (const chunk of source) {
    meter?.add(typeof chunk === 'string' ? Buffer.byteLength(chunk) : chunk.length);
    yield chunk;
  }
}
