/**
 * Finding a folder's documents with fast-glob.
 *
 * @module
 */
import { stat } from 'node:fs/promises';
import path from 'node:path';
import fg from 'fast-glob';
import type { Skipped } from '../types.js';
import { unreadableReason } from './io-errors.js';

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
}

/** Code-unit order, independent of locale. */
export function byCodeUnit(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Lists the files of `folder` (absolute) that match `include` and not
 * `exclude` nor {@link ALWAYS_EXCLUDED}. Matching ignores case (so
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
): Promise<FolderListing> {
  const entries = await fg([...include], {
    cwd: folder,
    dot: false,
    followSymbolicLinks: false,
    onlyFiles: false,
    caseSensitiveMatch: false,
    ignore: [...exclude, ...ALWAYS_EXCLUDED],
    suppressErrors: true,
    objectMode: true,
    unique: true,
  });
  const files: string[] = [];
  const skipped: Skipped[] = [];
  const linkedFolders: string[] = [];
  const shownOf = (rel: string): string => path.posix.join(shown.replace(/\\/g, '/'), rel);
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
  files.sort(byCodeUnit);
  skipped.sort((a, b) => byCodeUnit(a.source, b.source));
  linkedFolders.sort(byCodeUnit);
  return { files, skipped, linkedFolders };
}
