/**
 * Checks a command's output folders before any heavy work: that no input
 * lies inside one (a run replaces the folder), that `--out` and
 * `--save-vectors` do not overlap, that an existing folder holds only what an
 * earlier sheaf run wrote, and that the folders can be written. Says
 * "replacing the earlier run in DIR" for each folder a run will replace.
 *
 * @module
 */
import { realpath } from 'node:fs/promises';
import path from 'node:path';
import type { CliIo } from './io.js';
import { assertReplaceable, assertWritable } from '../report/folder.js';
import { UsageError } from '../util/errors.js';

/** The output folders of one command and what it reads. */
export interface OutputPlan {
  /** The positional inputs as given (`-` is standard input and is not checked). */
  readonly inputs: readonly string[];
  /** Other files the run reads (`--model`, `--stopwords`), as given; undefined entries are ignored. */
  readonly alsoReads?: readonly (string | undefined)[];
  /** `--out` as given. */
  readonly out: string;
  /** `--save-vectors` as given, when set. */
  readonly saveVectors?: string;
  /** No notes on stderr. */
  readonly quiet?: boolean;
}

/** `p` with symlinks resolved as far as it exists (the missing tail is appended as given). */
export async function realPathAsFarAsExists(p: string): Promise<string> {
  const abs = path.resolve(p);
  let head = abs;
  const tail: string[] = [];
  for (;;) {
    try {
      return path.join(await realpath(head), ...tail);
    } catch {
      const parent = path.dirname(head);
      if (parent === head) return abs;
      tail.unshift(path.basename(head));
      head = parent;
    }
  }
}

/** True when `inner` is `outer` or lies inside it (both absolute). */
export function isWithin(inner: string, outer: string): boolean {
  const rel = path.relative(outer, inner);
  return rel === '' || (!rel.startsWith('..' + path.sep) && rel !== '..' && !path.isAbsolute(rel));
}

/**
 * Runs every check on `plan` (paths relative to `io.cwd`); throws
 * {@link UsageError} with one line on the first that fails, and writes
 * "sheaf: replacing the earlier run in DIR" to stderr (unless quiet) for
 * each folder that holds an earlier run.
 */
export async function checkOutputFolders(plan: OutputPlan, io: CliIo): Promise<void> {
  const folders: { flag: string; option: string; shown: string; real: string }[] = [{ flag: '--out', option: 'out', shown: plan.out, real: await realPathAsFarAsExists(path.resolve(io.cwd, plan.out)) }];
  if (plan.saveVectors !== undefined) {
    const real = await realPathAsFarAsExists(path.resolve(io.cwd, plan.saveVectors));
    if (isWithin(real, folders[0].real) || isWithin(folders[0].real, real)) {
      throw new UsageError(
        `--save-vectors ${plan.saveVectors} and --out ${plan.out} overlap (the same folder, or one inside the other); choose two separate folders`,
        'saveVectors',
      );
    }
    folders.push({ flag: '--save-vectors', option: 'saveVectors', shown: plan.saveVectors, real });
  }
  const reads = [...plan.inputs.filter((i) => i !== '-'), ...(plan.alsoReads ?? []).filter((i): i is string => i !== undefined)];
  for (const input of reads) {
    const real = await realPathAsFarAsExists(path.resolve(io.cwd, input));
    for (const f of folders) {
      if (isWithin(real, f.real)) {
        throw new UsageError(
          `input ${input} lies inside the output folder ${f.shown}, which this run would replace; move it or choose another ${f.flag}`,
          f.option,
        );
      }
    }
  }
  const replacing: string[] = [];
  for (const f of folders) {
    const target = path.resolve(io.cwd, f.shown);
    const state = await assertReplaceable(target, f.shown).catch((err: unknown) => {
      if (err instanceof UsageError && f.flag !== '--out') throw new UsageError(err.message.replace(/--out\b/, f.flag), f.option);
      throw err;
    });
    await assertWritable(target, f.shown, f.flag, f.option);
    if (state === 'earlier-run') replacing.push(f.shown);
  }
  if (!plan.quiet) for (const dir of replacing) io.stderr.write(`sheaf: replacing the earlier run in ${dir}\n`);
}
