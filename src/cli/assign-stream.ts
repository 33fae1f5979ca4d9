/**
 * `sheaf assign --stream jsonl|csv`: files the rows of CSV, TSV or JSON Lines
 * exports (files, or `-` for stdin) into a saved model's groups and writes one
 * row per input row to stdout as it goes, in batches, so memory stays flat
 * whatever the input's size and the command works as the map step of a batch
 * engine. Output waits whenever stdout says its buffer is full (`write`
 * returning false, until `drain`). EDGE.
 *
 * @module
 */
import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import type { CliIo, TextSink } from './io.js';
import { cleanModeFromFlags, ingestOptionsFromFlags, type GroupFlags } from './inputs.js';
import { decimal, wholeNumber } from './parse.js';
import { loadModel } from './model-path.js';
import { csvRows, jsonlRows, type StreamKind, type StreamRowOptions } from './stream-rows.js';
import { decodeStream } from '../ingest/decode.js';
import { peekText, firstSignificant } from '../ingest/peek.js';
import { EXPORT_EXTENSIONS, truncateUtf8, type IngestOptions } from '../ingest/index.js';
import { ASSIGNED_ROW_FORMATS, assignBatchText, assignedRowsHeader, streamCleaning, type AssignedRowFormat } from '../report/assigned-rows.js';
import type { Doc } from '../types.js';
import { UsageError, show } from '../util/errors.js';

/** Rows filed at a time unless `--batch` says otherwise. */
export const DEFAULT_STREAM_BATCH = 1000;

/** The flags the streaming assign reads. */
export interface AssignStreamFlags extends GroupFlags {
  model: string;
  minFit?: string;
  stream: string;
  batch?: string;
}

type EventSink = TextSink & {
  once?: (event: string, cb: (...args: unknown[]) => void) => unknown;
  on?: (event: string, cb: (...args: unknown[]) => void) => unknown;
  off?: (event: string, cb: (...args: unknown[]) => void) => unknown;
};

/**
 * Writes to stdout with backpressure: after a `write` that returns false it
 * waits for `drain`. When the reader goes away (EPIPE, as with `| head`) it
 * says so through `gone` and the caller stops; another write error is a failure.
 */
class Output {
  gone = false;
  private failure: Error | null = null;
  private readonly onError = (err: unknown): void => {
    if ((err as { code?: string }).code === 'EPIPE') this.gone = true;
    else this.failure = err as Error;
  };

  constructor(private readonly sink: EventSink) {
    sink.on?.('error', this.onError);
  }

  /** Writes `text`; resolves once the sink can take more (or has gone). */
  async write(text: string): Promise<void> {
    if (text === '' || this.gone) return;
    if (this.failure) throw this.failure;
    const ok = this.sink.write(text);
    if (ok === false && typeof this.sink.once === 'function') {
      await new Promise<void>((resolve) => {
        const done = (): void => {
          this.sink.off?.('drain', done);
          this.sink.off?.('error', done);
          this.sink.off?.('close', done);
          resolve();
        };
        this.sink.once?.('drain', done);
        this.sink.once?.('error', done);
        this.sink.once?.('close', done);
      });
    }
    if (this.failure) throw this.failure;
  }

  /** Stops listening for errors. */
  close(): void {
    this.sink.off?.('error', this.onError);
  }
}

/** The export kinds a stream reads, and the extensions that stand for them (from the readers' own table). */
const STREAMED: ReadonlySet<string> = new Set<StreamKind>(['csv', 'tsv', 'jsonl']);
const STREAMED_EXTENSIONS: readonly string[] = [...EXPORT_EXTENSIONS].filter(([, as]) => STREAMED.has(as)).map(([ext]) => ext);

/** Why a JSON array cannot be streamed, after `--stream reads …; <input> `. */
const JSON_ARRAY = 'a JSON array, which is read whole (write it as JSON Lines, one object per line)';

/**
 * Which reader an input gets: `--format`, else its extension (as the
 * whole-export readers map extensions, {@link EXPORT_EXTENSIONS}), else
 * (stdin, `null`) its first character.
 */
function kindFromName(input: string, format: string): StreamKind | null {
  if (STREAMED.has(format)) return format as StreamKind;
  if (format !== 'auto') throw new UsageError(`--stream reads csv, tsv or jsonl; got --format ${format}`, 'format');
  if (input === '-') return null;
  const as = EXPORT_EXTENSIONS.get(path.extname(input).toLowerCase());
  if (as !== undefined && STREAMED.has(as)) return as as StreamKind;
  const why = as === 'json' ? `is ${JSON_ARRAY}` : `is none of ${STREAMED_EXTENSIONS.join(', ')} (name one with --format)`;
  throw new UsageError(`--stream reads CSV, TSV or JSON Lines exports; ${input} ${why}`, 'format');
}

async function openInput(input: string, io: CliIo): Promise<Readable> {
  if (input === '-') {
    if (!io.stdin) throw new UsageError('no standard input to read', 'inputs');
    return io.stdin;
  }
  const file = path.resolve(io.cwd, input);
  let info;
  try {
    info = await stat(file);
  } catch {
    throw new UsageError(`no such file: ${input}`, 'inputs');
  }
  if (info.isDirectory()) throw new UsageError(`--stream reads files or - (stdin), not folders; got ${input}`, 'inputs');
  return createReadStream(file);
}

/** Documents streamed from inputs, and how many texts were cut to `maxBytes` so far. */
export interface StreamedDocuments {
  readonly docs: AsyncGenerator<Doc>;
  cut(): number;
}

/**
 * Opens every input (files, or `-` for stdin; folders refused) and checks its
 * kind before anything is read, then yields their rows as documents, input
 * after input: each row read by the whole-export readers' per-row code (see
 * `stream-rows.ts`), so it has the id, title, text and fields `sheaf group`
 * gives it (a repeated id kept as given), texts cut to `maxBytes` as the
 * whole-pile readers cut them. Memory holds one batch of rows at a time.
 */
export async function streamDocuments(inputs: readonly string[], ingestOptions: IngestOptions, io: CliIo): Promise<StreamedDocuments> {
  if (inputs.filter((i) => i === '-').length > 1) throw new UsageError('stdin (-) can be read once', 'inputs');
  const rowOptions: StreamRowOptions = { text: ingestOptions.text, id: ingestOptions.id, title: ingestOptions.title, delimiter: ingestOptions.delimiter };
  const sources: Readable[] = [];
  for (const i of inputs) sources.push(await openInput(i, io));
  const kinds = inputs.map((i) => kindFromName(i, ingestOptions.format));
  let cut = 0;
  async function* all(): AsyncGenerator<Doc> {
    for (let k = 0; k < inputs.length; k++) {
      const name = inputs[k] === '-' ? 'stdin' : inputs[k];
      let chunks: AsyncIterable<string> = decodeStream(sources[k], () => undefined, { hash: false, forced: ingestOptions.encoding, nul: 'clean' });
      let kind = kinds[k];
      if (kind === null) {
        const peeked = await peekText(chunks, (head) => firstSignificant(head) !== '' || head.length > 4096);
        chunks = peeked.all;
        const first = firstSignificant(peeked.head);
        if (first === '[') throw new UsageError(`--stream reads CSV, TSV or JSON Lines exports; ${name} holds ${JSON_ARRAY}`, 'format');
        kind = first === '{' ? 'jsonl' : 'csv';
      }
      const batches = kind === 'jsonl' ? jsonlRows(chunks, name, rowOptions) : csvRows(chunks, name, kind, rowOptions);
      for await (const batch of batches) {
        for (const d of batch) {
          const t = truncateUtf8(d.text, ingestOptions.maxBytes);
          if (t) cut++;
          yield t ? { ...d, text: t.text } : d;
        }
      }
    }
  }
  return { docs: all(), cut: () => cut };
}

/** Runs the streaming assign (`outGiven`: the user named `--out`, which a stream does not write); resolves to the exit code. */
export async function runAssignStream(inputs: string[], flags: AssignStreamFlags, io: CliIo, outGiven = false): Promise<number> {
  if (outGiven) throw new UsageError('stream writes rows to stdout and --out a folder; give one of them', 'stream');
  if (flags.json) throw new UsageError('stream writes rows to stdout and --json the counts; give one of them', 'stream');
  const format = flags.stream as AssignedRowFormat;
  if (!(ASSIGNED_ROW_FORMATS as readonly string[]).includes(format)) {
    throw new UsageError(`stream must be one of ${ASSIGNED_ROW_FORMATS.join(', ')}; got ${show(flags.stream)}`, 'stream');
  }
  const batch = flags.batch === undefined ? DEFAULT_STREAM_BATCH : (wholeNumber(flags.batch, 'batch') as number);
  if (!(batch >= 1)) throw new UsageError(`batch must be a whole number of rows from 1; got ${flags.batch}`, 'batch');
  const minFit = decimal(flags.minFit, 'minFit');
  if (minFit !== undefined && !(minFit >= -1 && minFit <= 1)) throw new UsageError(`minFit must be a number from -1 to 1; got ${minFit}`, 'minFit');
  const mode = cleanModeFromFlags(flags);
  if (mode === 'auto') throw new UsageError('clean auto judges the whole pile, which a stream cannot; choose tickets or none (default: the model’s)', 'clean');
  const ingestOptions = ingestOptionsFromFlags(flags);
  const model = await loadModel(flags.model, io.cwd);
  const cleaning = streamCleaning(model, mode);
  const docs = await streamDocuments(inputs, ingestOptions, io);

  const out = new Output(io.stdout as EventSink);
  let rows = 0;
  try {
    await out.write(assignedRowsHeader(format));
    const pending: Doc[] = [];
    const flush = async (): Promise<void> => {
      if (pending.length === 0) return;
      const text = assignBatchText(model, pending, cleaning, format, minFit);
      pending.length = 0;
      await out.write(text);
    };
    for await (const d of docs.docs) {
      pending.push(d);
      rows++;
      if (pending.length >= batch) await flush();
      if (out.gone) break;
    }
    await flush();
  } finally {
    out.close();
  }
  // The reader went away (`| head`): what it wanted is written; nothing more to say.
  if (out.gone) return 0;
  const cut = docs.cut();
  if (!flags.quiet) {
    io.stderr.write(`sheaf: ${rows} row(s) filed into the model's ${model.groups} groups` + (cut ? `; ${cut} text(s) longer than --max-bytes were cut` : '') + '\n');
  }
  return 0;
}
