/**
 * Finding a folder's documents with fast-glob.
 *
 * @module
 */
import { readdir as fsReaddir } from 'node:fs';
import { stat } from 'node:fs/promises';
import path from 'node:path';
import fg from 'fast-glob';
import type { Skipped } from '../types.js';
import { MARKER } from '../report/folder.js';
import { unreadableReason } from './io-errors.js';

/** Reason a folder sheaf wrote (its marker file, or a staging folder) is not read. */
export const SHEAF_OUTPUT_REASON = 'a folder sheaf wrote (an earlier output); never read as input';

/**
 * Reason a file that no `include` pattern names is listed with. With
 * `--include '**\/*'` every file is read: unknown extensions as plain text
 * when they sniff as text, binary files skipped.
 */
export const NOT_A_FORMAT_REASON = "not a format sheaf reads; to read it, add a pattern such as --include '**/*' (unknown extensions are read as plain text)";

/** Names of folders sheaf stages and retires outputs in (see `writeOutputFolder`). */
const STAGING = /^\.sheaf-(tmp|old)-/;

/** A seam for tests: the error listing an absolute folder should fail with, or `null` to list it. */
export type ReaddirFailure = (absoluteFolder: string) => NodeJS.ErrnoException | null;

/** Folders never searched, whatever the patterns say. */
export const ALWAYS_EXCLUDED: readonly string[] = Object.freeze(['**/node_modules/**']);

/** What a folder search found. */
export interface FolderListing {
  /** Files to read, as paths relative to the folder with forward slashes, sorted by code unit. */
  readonly files: string[];
  /** Entries that could not be used (broken links, special files). */
  readonly skipped: Skipped[];
  /** Links to folders, which are not followed (they can form loops). */
  readonly linkedFolders: string[];
  /**
   * Files no `include` pattern names (extensions sheaf does not read by
   * default: README, `.rst`, `.gz`…), relative like `files`, sorted; dotfiles,
   * `exclude`d files and sheaf's own outputs are not listed.
   */
  readonly notIncluded: string[];
  /** True when the folder itself is one sheaf wrote (holds the marker file); nothing in it is listed. */
  readonly sheafOutput: boolean;
}

/** Code-unit order, independent of locale. */
export function byCodeUnit(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Lists the files of `folder` (absolute) that match `include` and not
 * `exclude` nor {@link ALWAYS_EXCLUDED}, nor inside a folder sheaf wrote
 * (one holding the marker file, or a `.sheaf-tmp-*`/`.sheaf-old-*` staging
 * folder: those are listed in `skipped`). Folders that cannot be listed are
 * in `skipped` with the reason. `listOthers` also lists the files no
 * `include` pattern names (in `notIncluded`; the default patterns are on,
 * so a README does not vanish without a word). Matching ignores case (so
 * `*.md` finds `README.MD`); names starting with a dot are matched only by a
 * pattern that spells the dot. Links to files are read; links to folders are
 * not followed, so link loops cannot trap the search. `shown` is the folder
 * as the user gave it, for sources.
 */
export async function listFolder(
  folder: string,
  shown: string,
  include: readonly string[],
  exclude: readonly string[],
  readdirFailure: ReaddirFailure | null = null,
  listOthers = false,
): Promise<FolderListing> {
  const shownOf = (rel: string): string => path.posix.join(shown.replace(/\\/g, '/'), rel);
  const skipped: Skipped[] = [];
  // Folders that cannot be listed are noted, not silently dropped.
  const unlisted = new Map<string, string>();
  let recording = false; // only the walk of the files to read reports folders (not hidden or excluded ones)
  type Done = (err: NodeJS.ErrnoException | null, entries: unknown[]) => void;
  const readdir = ((dir: string, optsOrCb: unknown, maybeCb?: Done): void => {
    const cb = (maybeCb ?? optsOrCb) as Done;
    const opts = maybeCb === undefined ? {} : optsOrCb;
    const abs = path.resolve(folder, dir);
    const failure = readdirFailure?.(abs) ?? null;
    const done = (err: NodeJS.ErrnoException | null, entries: unknown[]): void => {
      if (err) {
        const rel = path.relative(folder, abs).split(path.sep).join('/');
        if (recording && !unlisted.has(rel)) unlisted.set(rel, `folder ${unreadableReason(err)}; its files were not read`);
        cb(null, []);
      } else cb(null, entries);
    };
    if (failure) done(failure, []);
    else fsReaddir(abs, opts as { withFileTypes: true }, (err, entries) => done(err, entries as unknown[]));
  }) as unknown as typeof fsReaddir;
  // 1. Folders sheaf wrote: never read, listed once each.
  const owned = await fg([`**/${MARKER}`, '**/.sheaf-tmp-*', '**/.sheaf-old-*'], {
    cwd: folder,
    dot: true,
    followSymbolicLinks: false,
    onlyFiles: false,
    ignore: [...exclude, ...ALWAYS_EXCLUDED],
    suppressErrors: true,
    objectMode: true,
    fs: { readdir },
  });
  const ownedDirs = new Set<string>();
  for (const e of owned) {
    const base = path.posix.basename(e.path);
    if (base === MARKER) ownedDirs.add(path.posix.dirname(e.path));
    else if (STAGING.test(base) && e.dirent.isDirectory()) ownedDirs.add(e.path);
  }
  if (ownedDirs.has('.')) {
    return { files: [], skipped: [{ source: shown.replace(/\\/g, '/'), reason: SHEAF_OUTPUT_REASON }], linkedFolders: [], notIncluded: [], sheafOutput: true };
  }
  // Only the outermost ones: a folder inside another sheaf folder goes with it.
  const outer = [...ownedDirs].sort(byCodeUnit).filter((d, i, all) => !all.slice(0, i).some((o) => d.startsWith(`${o}/`)));
  for (const d of outer) skipped.push({ source: shownOf(d), reason: SHEAF_OUTPUT_REASON });
  const ignore = [...exclude, ...ALWAYS_EXCLUDED, ...outer.map((d) => `${fg.escapePath(d)}/**`)];

  // 2. The files to read.
  recording = true;
  const entries = await fg([...include], {
    cwd: folder,
    dot: false,
    followSymbolicLinks: false,
    onlyFiles: false,
    caseSensitiveMatch: false,
    ignore,
    suppressErrors: true,
    objectMode: true,
    unique: true,
    fs: { readdir },
  });
  recording = false;
  const files: string[] = [];
  const linkedFolders: string[] = [];
  for (const e of entries) {
    const rel = e.path;
    if (e.dirent.isFile()) {
      files.push(rel);
    } else if (e.dirent.isSymbolicLink()) {
      try {
        const s = await stat(path.join(folder, rel));
        if (s.isFile()) files.push(rel);
        else if (s.isDirectory()) linkedFolders.push(shownOf(rel));
        else skipped.push({ source: shownOf(rel), reason: 'not a regular file' });
      } catch (err) {
        skipped.push({ source: shownOf(rel), reason: unreadableReason(err) });
      }
    } else if (!e.dirent.isDirectory()) {
      skipped.push({ source: shownOf(rel), reason: 'not a regular file' });
    }
  }
  for (const [rel, reason] of unlisted) skipped.push({ source: rel === '' ? shown.replace(/\\/g, '/') : shownOf(rel), reason });

  // 3. Files of other formats: listed, so nothing vanishes without a word.
  const all = !listOthers ? [] : await fg(['**/*'], { cwd: folder, dot: false, followSymbolicLinks: false, onlyFiles: true, ignore, suppressErrors: true, fs: { readdir } });
  const included = new Set(entries.map((e) => e.path));
  const notIncluded = all.filter((rel) => !included.has(rel)).sort(byCodeUnit);

  files.sort(byCodeUnit);
  skipped.sort((a, b) => byCodeUnit(a.source, b.source));
  linkedFolders.sort(byCodeUnit);
  return { files, skipped, linkedFolders, notIncluded, sheafOutput: false };
}

/**
 * The path, as bytes, of a file whose name is not valid UTF-8: fast-glob
 * lists it with U+FFFD in place of the bad bytes, and that string names no
 * file. Each segment of `rel` is matched against the raw names of its
 * folder; returns `null` when no name, or more than one, reads as it.
 */
export async function rawNamePath(folder: string, rel: string): Promise<Buffer | null> {
  const { readdir } = await import('node:fs/promises');
  let at = Buffer.from(folder, 'utf8');
  for (const seg of rel.split('/')) {
    let names: Buffer[];
    try {
      names = await readdir(at, { encoding: 'buffer' });
    } catch {
      return null;
    }
    const hits = names.filter((n) => n.toString('utf8') === seg);
    if (hits.length !== 1) return null;
    at = Buffer.concat([at, Buffer.from(path.sep, 'utf8'), hits[0] as Buffer]);
  }
  return at;
}
