/**
 * Writes an output folder atomically: every file goes into a fresh sibling
 * staging folder first, and only when all are written does it take the place
 * of the target.
 *
 * A folder sheaf wrote holds a marker file, {@link MARKER}, that is also the
 * manifest of the files sheaf wrote there (see {@link OutputManifest}). An
 * existing target is replaced only when it is empty, or when every entry in it
 * is listed in its manifest; anything else in it (a person's notes, a folder
 * they added) makes the write refuse with a {@link UsageError} naming it.
 *
 * Staging folders are named `.sheaf-tmp-<name>-p<pid>-<tag>` (and the earlier
 * run, while it is being swapped out, `.sheaf-old-<name>-p<pid>-<tag>`), so a
 * later run can tell whether the process that made one is gone and remove it
 * ({@link removeStaleStaging}). The folders in flight in this process are
 * listed by {@link liveStagingFolders} and removed by
 * {@link removeLiveStagingSync}, which a signal handler at the CLI edge calls;
 * this module installs no handlers and never prints.
 *
 * @module
 */
import { lstat, mkdir, open, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { existsSync, renameSync, rmSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { UsageError } from '../util/errors.js';

/** Name of the marker file that says "sheaf wrote this folder"; it holds the {@link OutputManifest}. Other code skips folders holding it. */
export const MARKER = '.sheaf-output';

/**
 * The content of {@link MARKER} (our own format, JSON):
 *
 * ```json
 * { "sheaf": "output folder", "note": "…", "files": ["documents.csv", "run.json", "sub/x.txt"] }
 * ```
 *
 * `files` lists every file sheaf wrote into the folder, as paths relative to
 * it with `/` between folder names, sorted; the marker itself is not listed.
 * `note` is a sentence for a person who opens the file. A marker that does not
 * parse as this (for example the one-line text marker earlier versions wrote)
 * is read as a manifest of {@link LEGACY_OUTPUT_FILES}: only the file names
 * those versions could write count as sheaf's own.
 */
export interface OutputManifest {
  readonly sheaf: 'output folder';
  readonly note: string;
  readonly files: readonly string[];
}

/**
 * The files an output folder written before markers held a manifest could
 * contain (every name `group`, `tree`, `duplicates`, `assign` and
 * `--save-vectors` wrote). Under such a marker, any other entry is foreign.
 */
export const LEGACY_OUTPUT_FILES: readonly string[] = Object.freeze([
  'assigned.csv',
  'documents.csv',
  'documents.nwk',
  'duplicates.csv',
  'duplicates.json',
  'groups.json',
  'ids.txt',
  'model.json',
  'report.html',
  'run.json',
  'terms.txt',
  'tree.json',
  'tree.nwk',
  'vectors.mtx',
]);

/** A staging folder older than this, named without a process id (by earlier versions), counts as stale. */
export const LEGACY_STAGING_MAX_AGE_MS = 60 * 60 * 1000;

/** A file's content: text, bytes, or text in pieces (written one after another, never joined in memory). */
export type FileContent = string | Uint8Array | Iterable<string>;

/** What an output path holds before a run writes it. */
export type OutputFolderState = 'absent' | 'empty' | 'earlier-run';

/** The result of {@link writeOutput}. */
export interface OutputWrite {
  /** Paths of the files written (`dir` joined with each name). */
  readonly files: string[];
  /** True when an earlier sheaf run in the folder was replaced. */
  readonly replaced: boolean;
}

interface Swap {
  readonly staging: string;
  old: string | null;
  readonly target: string;
  /** Set by {@link removeLiveStagingSync}: the write stops at its next step. */
  cancelled: boolean;
}

const live = new Set<Swap>();

/**
 * Writes `files` (name → content) as folder `dir`, replacing an earlier sheaf
 * output there (see {@link assertReplaceable}). Returns the file paths written.
 */
export async function writeOutputFolder(dir: string, files: ReadonlyMap<string, FileContent>): Promise<string[]> {
  return (await writeOutput(dir, files)).files;
}

/**
 * Like {@link writeOutputFolder}, and also says whether an earlier run was
 * replaced. Before writing it removes stale staging folders beside the target
 * ({@link removeStaleStaging}).
 */
export async function writeOutput(dir: string, files: ReadonlyMap<string, FileContent>): Promise<OutputWrite> {
  const target = path.resolve(dir);
  const state = await assertReplaceable(target, dir);
  const parent = path.dirname(target);
  await mkdir(parent, { recursive: true });
  await removeStaleStaging(target);
  const tag = `p${process.pid}-${randomBytes(6).toString('hex')}`;
  const swap: Swap = { staging: path.join(parent, `.sheaf-tmp-${path.basename(target)}-${tag}`), old: null, target, cancelled: false };
  live.add(swap);
  const go = (): void => {
    if (swap.cancelled) throw new Error(`writing ${dir} was stopped`);
  };
  try {
    await mkdir(swap.staging);
    await writeFile(path.join(swap.staging, MARKER), manifestText([...files.keys()]));
    for (const [name, content] of files) {
      go();
      const file = path.join(swap.staging, name);
      await mkdir(path.dirname(file), { recursive: true });
      await writeContent(file, content);
    }
    go();
    if (await exists(target)) {
      const old = path.join(parent, `.sheaf-old-${path.basename(target)}-${tag}`);
      await rename(target, old);
      swap.old = old;
      try {
        await rename(swap.staging, target);
      } catch (err) {
        await rename(old, target);
        swap.old = null;
        throw err;
      }
      await rm(old, { recursive: true, force: true });
      swap.old = null;
    } else {
      await rename(swap.staging, target);
    }
  } catch (err) {
    await rm(swap.staging, { recursive: true, force: true });
    throw err;
  } finally {
    live.delete(swap);
  }
  return { files: [...files.keys()].map((name) => path.join(dir, name)), replaced: state === 'earlier-run' };
}

/** The manifest text for a folder holding `names` (see {@link OutputManifest}). */
function manifestText(names: readonly string[]): string {
  const manifest: OutputManifest = {
    sheaf: 'output folder',
    note: 'sheaf wrote this folder and replaces it on a later run only while it holds nothing but the files listed here',
    files: names.map((n) => n.split(path.sep).join('/')).sort(),
  };
  return JSON.stringify(manifest, null, 2) + '\n';
}

/** Reads a marker's text as the list of files sheaf wrote (legacy markers: {@link LEGACY_OUTPUT_FILES}). */
export function manifestFiles(text: string): readonly string[] {
  try {
    const m = JSON.parse(text) as Partial<OutputManifest>;
    if (m && m.sheaf === 'output folder' && Array.isArray(m.files) && m.files.every((f) => typeof f === 'string' && f !== '')) {
      return m.files;
    }
  } catch {
    // not JSON: a marker from before manifests
  }
  return LEGACY_OUTPUT_FILES;
}

/**
 * Says what `target` holds, and throws {@link UsageError} when a run must not
 * replace it: it is not a folder, it is a non-empty folder without
 * {@link MARKER}, or it holds an entry its manifest does not list (the first
 * such entry in sorted order is named; a folder as `name/`).
 */
export async function assertReplaceable(target: string, shown: string = target): Promise<OutputFolderState> {
  let st;
  try {
    st = await stat(target);
  } catch {
    return 'absent';
  }
  if (!st.isDirectory()) {
    throw new UsageError(`output path ${shown} exists and is not a folder; choose another --out`, 'out');
  }
  const entries = await readdir(target);
  if (entries.length === 0) return 'empty';
  if (!entries.includes(MARKER)) {
    throw new UsageError(
      `output folder ${shown} already exists and was not written by sheaf; choose another --out or empty it`,
      'out',
    );
  }
  const listed = manifestFiles(await readFile(path.join(target, MARKER), 'utf8'));
  const foreign = await firstForeignEntry(target, listed);
  if (foreign !== null) {
    throw new UsageError(`output folder ${shown} holds ${foreign}, which sheaf did not write; move it or choose another --out`, 'out');
  }
  return 'earlier-run';
}

/** The first entry under `root` (sorted, depth first) that `listed` does not account for, or null. */
async function firstForeignEntry(root: string, listed: readonly string[]): Promise<string | null> {
  const files = new Set(listed);
  const folders = new Set<string>();
  for (const f of listed) {
    const parts = f.split('/');
    for (let i = 1; i < parts.length; i++) folders.add(parts.slice(0, i).join('/'));
  }
  const walk = async (rel: string): Promise<string | null> => {
    const entries = await readdir(path.join(root, rel), { withFileTypes: true });
    entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const r = rel === '' ? e.name : `${rel}/${e.name}`;
      if (r === MARKER || (rel === '' && r.startsWith('.sheaf-probe-p'))) continue; // a probe left by a killed writability check
      if (e.isDirectory()) {
        if (!folders.has(r)) return `${r}/`;
        const inner = await walk(r);
        if (inner !== null) return inner;
      } else if (!files.has(r)) {
        return r;
      }
    }
    return null;
  };
  return walk('');
}

/**
 * Throws {@link UsageError} (naming `flag`, such as `--out`) unless this
 * process can write `target`: creates and removes a probe folder in the
 * nearest existing folder at or above the target's parent (where the staging
 * folder goes) and, when the target exists, a probe file inside it (its
 * entries are removed on replacement). It tries the real thing, so it is
 * right for root too. `fs` replaces the two calls that create, for tests.
 */
export async function assertWritable(
  target: string,
  shown: string,
  flag: string,
  option: string,
  fs: { mkdir: (p: string) => Promise<unknown>; writeFile: (p: string, s: string) => Promise<unknown> } = { mkdir: (p) => mkdir(p), writeFile: (p, s) => writeFile(p, s, { flag: 'wx' }) },
): Promise<void> {
  const fail = (err: unknown): never => {
    const e = err as NodeJS.ErrnoException;
    throw new UsageError(`cannot write ${flag} ${shown} (${e?.code ?? e?.message ?? String(err)}); choose another ${flag}`, option);
  };
  let dir = path.dirname(target);
  for (;;) {
    try {
      const st = await stat(dir);
      if (!st.isDirectory()) fail({ code: `${dir} is not a folder` });
      break;
    } catch (err) {
      if (err instanceof UsageError) throw err;
      const parent = path.dirname(dir);
      if (parent === dir) fail(err);
      dir = parent;
    }
  }
  const probe = path.join(dir, `.sheaf-tmp-${path.basename(target)}-p${process.pid}-probe`);
  try {
    await fs.mkdir(probe);
  } catch (err) {
    fail(err);
  }
  await rm(probe, { recursive: true, force: true });
  let st;
  try {
    st = await stat(target);
  } catch {
    return;
  }
  if (!st.isDirectory()) return; // assertReplaceable says what is wrong
  const file = path.join(target, `.sheaf-probe-p${process.pid}`);
  try {
    await fs.writeFile(file, '');
  } catch (err) {
    fail(err);
  }
  await rm(file, { force: true });
}

/** Staging folders (and earlier runs being swapped out) that writes in this process have in flight, as absolute paths. */
export function liveStagingFolders(): string[] {
  return [...live].flatMap((s) => (s.old ? [s.staging, s.old] : [s.staging]));
}

/**
 * Removes, synchronously, every staging folder this process has in flight,
 * putting an earlier run back when the swap stopped half-way (target gone,
 * earlier run still beside it). For a SIGINT/SIGTERM handler; returns the
 * staging folders removed.
 */
export function removeLiveStagingSync(): string[] {
  const removed: string[] = [];
  for (const s of live) {
    s.cancelled = true;
    if (existsSync(s.staging)) {
      rmSync(s.staging, { recursive: true, force: true });
      removed.push(s.staging);
    }
    if (s.old && existsSync(s.old)) {
      if (!existsSync(s.target)) renameSync(s.old, s.target);
      else rmSync(s.old, { recursive: true, force: true });
    }
  }
  live.clear();
  return removed;
}

/** True when process `pid` exists (signal 0 checks without sending; EPERM means it exists under another user). */
function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Removes the staging folders beside `target` (`.sheaf-tmp-<name>-p<pid>-…`)
 * whose process is gone, and `.sheaf-old-<name>-p<pid>-…` earlier runs left by
 * such a process: put back as the target when the target is missing, removed
 * otherwise. Staging folders from versions that put no pid in the name are
 * removed once older than {@link LEGACY_STAGING_MAX_AGE_MS}. Returns the paths
 * removed or put back.
 */
export async function removeStaleStaging(target: string, alive: (pid: number) => boolean = processAlive, nowMs: number = Date.now()): Promise<string[]> {
  const parent = path.dirname(target);
  const name = path.basename(target);
  let entries: string[];
  try {
    entries = await readdir(parent);
  } catch {
    return [];
  }
  const done: string[] = [];
  const esc = name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const withPid = new RegExp(`^\\.sheaf-(tmp|old)-${esc}-p(\\d+)-(?:[0-9a-f]{12}|probe)$`);
  const legacy = new RegExp(`^\\.sheaf-tmp-${esc}-[0-9a-f]{12}$`);
  for (const entry of entries.sort()) {
    const full = path.join(parent, entry);
    const m = withPid.exec(entry);
    if (m) {
      const pid = Number(m[2]);
      if (pid === process.pid || alive(pid)) continue;
      if (m[1] === 'old' && !(await exists(target))) await rename(full, target);
      else await rm(full, { recursive: true, force: true });
      done.push(full);
    } else if (legacy.test(entry)) {
      const st = await lstat(full).catch(() => null);
      if (st && st.isDirectory() && nowMs - st.mtimeMs > LEGACY_STAGING_MAX_AGE_MS) {
        await rm(full, { recursive: true, force: true });
        done.push(full);
      }
    }
  }
  return done;
}

async function writeContent(file: string, content: FileContent): Promise<void> {
  if (typeof content === 'string' || content instanceof Uint8Array) {
    await writeFile(file, content);
    return;
  }
  const handle = await open(file, 'wx');
  try {
    for (const chunk of content) await handle.write(chunk);
  } finally {
    await handle.close();
  }
}

async function exists(p: string): Promise<boolean> {
  try {
    await stat(p);
    return true;
  } catch {
    return false;
  }
}
