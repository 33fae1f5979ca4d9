/**
 * The memory check made before the heavy work: an estimate of the peak
 * memory a run will take, from the size of its input, against `--memory`.
 *
 * The estimate is a fixed base plus a multiple of the input's bytes, fitted to
 * peaks measured on this kind of machine (2 cores, Node 20.20, default
 * threads) with `/usr/bin/time -v` ("Maximum resident set size") on tickets
 * from `bench/generate.mjs` (seed 7, ~58 words and ~400 bytes a row):
 *
 *   node bench/generate.mjs --sizes 63k,318k --seed 7 --out DIR
 *   /usr/bin/time -v node dist/cli/main.js group DIR/synth-63k.csv  --text text --id id --groups 50 --no-report --out o
 *   /usr/bin/time -v node dist/cli/main.js group DIR/synth-318k.csv --text text --id id --groups 50 --no-report --out o
 *
 * | rows | input bytes | report | peak RSS | estimate (256 MiB + 8 × bytes, until the refit below) | old estimate (200 MiB + 10.5 × bytes) |
 * |---|---|---|---|---|---|
 * | 63k  |  24,999,783 | off | 432,224 KiB = 443 MB  | 468 MB (+6%)   | 472 MB (+7%)   |
 * | 63k  |  24,999,783 | on  | 524,536 KiB = 537 MB  | 468 MB (−13%)  | 472 MB (−12%)  |
 * | 318k | 126,674,740 | off | 1,163,952 KiB = 1.19 GB | 1.28 GB (+8%) | 1.54 GB (+29%) |
 *
 * (near-copies on, the default, in all three). With reduced vectors, the default since for piles up
 * to 100k documents, the 63k run without the report peaked at 523,484 KiB = 536 MB (estimate −13%;
 * `/usr/bin/time -v node dist/cli/main.js group synth-63k.csv --text text --id id --groups 50 --no-report`). Earlier bench peaks (k = 100,
 * near-copies on) stay within 25% as well: 764 MB for 40 MB of CSV (100k rows;
 * estimate 588 MB, −23%) and 4.05 GB for 398 MB (1M rows; 3.45 GB, −15%). The fit
 * was the line through the two runs without the report, rounded (256 MiB + 8 ×
 * bytes); the report adds about 4 bytes per input byte at 63k, so a default run
 * stays within 25% of the estimate.
 *
 * Refit on 2026-12-03 after UTF-8 input became one-byte strings when it is ASCII
 * (src/ingest/decode.ts: texts held at half the size), k = 100, near-copies on, no report:
 *
 *   node bench/generate.mjs --sizes 60k,1m --out DIR
 *   /usr/bin/time -v node dist/cli/main.js group DIR/synth-60k.csv --text text --id id --groups 100 --no-report --out o
 *   /usr/bin/time -v node --cpu-prof dist/cli/main.js group DIR/synth-1m.csv --text text --id id --groups 100 --no-report --out o
 *
 * | rows | input bytes | peak RSS | 256 MiB + 8 × bytes | 256 MiB + 7 × bytes (now) |
 * |---|---|---|---|---|
 * | 60k | 23,810,967 | 541,604 KiB = 555 MB | 459 MB (−17%) | 435 MB (−22%) |
 * | 1M | 398,337,588 | 2,635,888 KiB = 2.70 GB | 3.46 GB (+28%) | 3.06 GB (+13%) |
 *
 * (the same 1M run before that change peaked at 4,048,956 KiB = 4.15 GB). 7 bytes per input byte keeps
 * every row of both tables within 25%: 63k −0% / −17% (report), 318k −3%, 60k −22%, 1M +13%. Per-row overhead (a document's fields and
 * id) is not modelled apart from bytes: an export with many columns per short
 * text will peak higher. A guard against starting what cannot finish, not an
 * exact figure.
 *
 * @module
 */
import { totalmem } from 'node:os';
import { stat } from 'node:fs/promises';
import path from 'node:path';
import { UsageError } from '../util/errors.js';

/** Bytes held at the peak per byte of input text (measured at 60k, 63k, 318k and 1M rows, see the module note). */
export const PEAK_PER_INPUT_BYTE = 7;
/** Bytes held at the peak whatever the input (the runtime, the code, small buffers; fitted, see the module note). */
export const PEAK_BASE = 256 * 1024 ** 2;
/** Share of the machine's memory used when `--memory` is not given. */
export const DEFAULT_MEMORY_SHARE = 0.6;

/** `8G`, `512M`, `1.5GB`, `2g`, or a plain number of bytes. */
export function parseSize(value: string, option = 'memory'): number {
  const m = /^\s*(\d+(?:\.\d+)?)\s*([kmgt]?)(?:i?b)?\s*$/i.exec(value);
  if (!m) throw new UsageError(`${option} must be a size such as 512M, 8G or 1.5GB; got ${JSON.stringify(value)}`, option);
  const unit = { '': 1, k: 1024, m: 1024 ** 2, g: 1024 ** 3, t: 1024 ** 4 }[m[2].toLowerCase() as '' | 'k' | 'm' | 'g' | 't'];
  const bytes = Math.floor(Number(m[1]) * unit);
  if (bytes < 64 * 1024 ** 2) throw new UsageError(`${option} must be at least 64M; got ${JSON.stringify(value)}`, option);
  return bytes;
}

/** The limit: `--memory` when given, else a safe share of the machine's memory. */
export function memoryLimit(flag: string | undefined): number {
  return flag === undefined ? Math.floor(DEFAULT_MEMORY_SHARE * totalmem()) : parseSize(flag);
}

/** Estimated peak bytes of a run over `inputBytes` bytes of input. */
export function estimatePeak(inputBytes: number): number {
  return PEAK_BASE + PEAK_PER_INPUT_BYTE * inputBytes;
}

/** Human size: 1.2 GB, 340 MB. */
export function formatSize(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${(bytes / 1024 ** 3).toFixed(1)} GB`;
  if (bytes >= 1024 ** 2) return `${Math.round(bytes / 1024 ** 2)} MB`;
  return `${Math.max(1, Math.round(bytes / 1024))} KB`;
}

/** Throws a one-line {@link UsageError} when the estimate for `inputBytes` exceeds `limit`. */
export function checkMemory(inputBytes: number, limit: number, what: string): void {
  const need = estimatePeak(inputBytes);
  if (need > limit) {
    throw new UsageError(
      `${what} (${formatSize(inputBytes)}) would need about ${formatSize(need)} of memory, more than the limit of ${formatSize(limit)}; ` +
        'raise --memory if the machine has it, or split the input',
      'memory',
    );
  }
}

/** Total size of the inputs that are plain files (folders and stdin are checked once read). */
export async function fileInputBytes(inputs: readonly string[], cwd: string): Promise<number> {
  let total = 0;
  for (const p of inputs) {
    if (p === '-') continue;
    try {
      const st = await stat(path.resolve(cwd, p));
      if (st.isFile()) total += st.size;
    } catch {
      // ingest reports missing paths with its own message
    }
  }
  return total;
}
