/**
 * Writes an output folder atomically: every file goes into a fresh sibling
 * folder first, and only when all are written does it take the place of the
 * target. A target folder that sheaf did not write (no marker file) and that is
 * not empty is never touched.
 *
 * @module
 */
import { mkdir, open, readdir, rename, rm, stat, writeFile } from 'node:fs/promises';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { UsageError } from '../util/errors.js';

/** Name of the marker file that says "sheaf wrote this folder". */
export const MARKER = '.sheaf-output';

/** Writes `files` (name → content) as folder `dir`, replacing an earlier sheaf output there. Returns the file paths written. */
/** A file's content: text, bytes, or text in pieces (written one after another, never joined in memory). */
export type FileContent = string | Uint8Array | Iterable<string>;

export async function writeOutputFolder(dir: string, files: ReadonlyMap<string, FileContent>): Promise<string[]> {
  const target = path.resolve(dir);
  await assertReplaceable(target, dir);
  const parent = path.dirname(target);
  await mkdir(parent, { recursive: true });
  const tag = randomBytes(6).toString('hex');
  const staging = path.join(parent, `.sheaf-tmp-${path.basename(target)}-${tag}`);
  await mkdir(staging);
  try {
    await writeFile(path.join(staging, MARKER), 'This folder was written by sheaf; sheaf may replace it on the next run.\n');
    for (const [name, content] of files) {
      const file = path.join(staging, name);
      await mkdir(path.dirname(file), { recursive: true });
      await writeContent(file, content);
    }
    const existing = await exists(target);
    if (existing) {
      const old = path.join(parent, `.sheaf-old-${path.basename(target)}-${tag}`);
      await rename(target, old);
      try {
        await rename(staging, target);
      } catch (err) {
        await rename(old, target);
        throw err;
      }
      await rm(old, { recursive: true, force: true });
    } else {
      await rename(staging, target);
    }
  } catch (err) {
    await rm(staging, { recursive: true, force: true });
    throw err;
  }
  return [...files.keys()].map((name) => path.join(dir, name));
}

/** Throws {@link UsageError} when `target` holds something sheaf did not write. */
export async function assertReplaceable(target: string, shown: string = target): Promise<void> {
  let st;
  try {
    st = await stat(target);
  } catch {
    return; // does not exist yet
  }
  if (!st.isDirectory()) {
    throw new UsageError(`output path ${shown} exists and is not a folder; choose another --out`, 'out');
  }
  const entries = await readdir(target);
  if (entries.length === 0 || entries.includes(MARKER)) return;
  throw new UsageError(
    `output folder ${shown} already exists and was not written by sheaf; choose another --out or empty it`,
    'out',
  );
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
