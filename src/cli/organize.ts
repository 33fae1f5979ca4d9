/**
 * `sheaf organize`: copies (or links) each input file of a grouping run into
 * a folder per group. Never moves, never overwrites; `--dry-run` shows the plan.
 *
 * @module
 */
import { constants, lstat, mkdir, open, readFile, realpath, symlink } from 'node:fs/promises';
import { createHash } from 'node:crypto';
import path from 'node:path';
import type { Command } from 'commander';
import { parse } from 'csv-parse/sync';
import type { CliIo } from './io.js';
import { UsageError } from '../util/errors.js';
import { visible } from './visible.js';
import { isWithin } from './out-paths.js';

interface OrganizeFlags {
  into: string;
  link?: boolean;
  dryRun?: boolean;
  quiet?: boolean;
}

/** Registers `organize` on the program. */
export function registerOrganize(program: Command, io: CliIo, setExit: (code: number) => void): void {
  program
    .command('organize')
    .description('copy each input file of a run into a folder per group (never moves or overwrites)')
    .argument('<run-folder>', 'an output folder of sheaf group (holding documents.csv and run.json)')
    .requiredOption('--into <dir>', 'where the group folders go')
    .option('--link', 'make symbolic links instead of copies')
    .option('--dry-run', 'print the plan; touch nothing')
    .option('--quiet', 'no notes on stderr')
    .action(async (runFolder: string, flags: OrganizeFlags) => {
      setExit(await runOrganize(runFolder, flags, io));
    });
}

const RESERVED = /^(con|prn|aux|nul|com[0-9¹²³]|lpt[0-9¹²³])$/i;
/** Longest folder or file name written, in UTF-16 code units (well under common 255-byte limits). */
export const NAME_MAX = 80;

/**
 * A safe name for one path segment: no separators or characters that are
 * reserved on common file systems, no control characters, no `.`/`..`, no
 * reserved device names, no trailing dots or blanks, capped in length.
 */
export function safeSegment(name: string, fallback = 'unnamed'): string {
  let s = name
    .normalize('NFC')
    .replace(/[\u0000-\u001f\u007f]/g, ' ')
    .replace(/[<>:"/\\|?*]/g, '-')
    .replace(/\s*·\s*/g, ' - ')
    .replace(/\s+/g, ' ')
    .trim();
  if (s.length > NAME_MAX) s = s.slice(0, NAME_MAX).trim();
  s = s.replace(/[. ]+$/, '');
  if (s === '' || s === '.' || s === '..') s = fallback;
  if (RESERVED.test(s.split('.')[0] ?? '')) s = `_${s}`;
  return s;
}

/** Folder name of a group: zero-padded id, then the label, so names are unique and sort by group. */
export function groupFolderName(group: number, label: string, groups: number): string {
  const id = String(group).padStart(String(Math.max(groups - 1, 0)).length, '0');
  return safeSegment(`${id} ${label}`);
}

/** One planned copy. */
export interface OrganizeStep {
  readonly from: string;
  readonly to: string;
}

/** The copy plan (pure): each file document → `into/<group folder>/<its relative id, segment by segment>`. */
export function organizePlan(
  into: string,
  docs: readonly { id: string; group: string; label: string; path: string }[],
  groups: number,
): OrganizeStep[] {
  const taken = new Set<string>();
  const steps: OrganizeStep[] = [];
  for (const d of docs) {
    const folder = d.group === '' ? 'no group' : groupFolderName(Number(d.group), d.label, groups);
    const segments = d.id.split('/').map((s) => safeSegment(s));
    let to = path.join(into, folder, ...segments);
    // Two ids can become the same safe name: number the later ones.
    for (let n = 2; taken.has(to); n++) {
      const ext = path.extname(segments[segments.length - 1]);
      const base = segments[segments.length - 1].slice(0, segments[segments.length - 1].length - ext.length);
      to = path.join(into, folder, ...segments.slice(0, -1), `${base} (${n})${ext}`);
    }
    taken.add(to);
    steps.push({ from: d.path, to });
  }
  return steps;
}

/** One input file as `run.json` lists it: id, absolute path, and (since it is recorded) the SHA-256 of its bytes. */
export interface RunFile {
  readonly id: string;
  readonly path: string;
  readonly sha256?: string;
}

/**
 * The folder of `to` made under `into`, one component at a time, never through
 * a link: each existing component is checked with lstat. Returns null when made,
 * or why the file cannot go there.
 */
async function makeFolderUnder(into: string, to: string, shown: (p: string) => string): Promise<string | null> {
  const parts = path.relative(into, path.dirname(to)).split(path.sep).filter((x) => x !== '');
  let at = into;
  for (const part of parts) {
    at = path.join(at, part);
    let st;
    try {
      st = await lstat(at);
    } catch (err) {
      if ((err as { code?: string }).code !== 'ENOENT') return fsReason(err);
      try {
        await mkdir(at);
        continue;
      } catch (e) {
        return fsReason(e);
      }
    }
    if (st.isSymbolicLink()) return `${shown(at)} is a link; links inside --into are never followed`;
    if (!st.isDirectory()) return `${shown(at)} is a file where its folder goes`;
  }
  return null;
}

function fsReason(err: unknown): string {
  const code = (err as { code?: string }).code;
  if (code === 'EEXIST') return 'already exists (never overwritten)';
  if (code === 'ENAMETOOLONG') return 'the path is too long for the file system';
  if (code === 'ENOTDIR') return 'a file is in the way of its folder';
  if (code === 'EACCES' || code === 'EPERM') return 'permission denied';
  return code ?? (err as Error)?.message ?? 'failed';
}

/**
 * The bytes of an input file when it may be copied: it lies (after resolving
 * links) under one of the run's input roots, is a regular file, and its SHA-256
 * is the one run.json recorded. Otherwise why not.
 */
async function checkedSource(f: { path: string; sha256?: string }, roots: readonly string[]): Promise<{ bytes: Buffer } | { reason: string }> {
  if (typeof f.sha256 !== 'string' || !/^[0-9a-f]{64}$/.test(f.sha256)) return { reason: 'run.json records no SHA-256 for it; not copied' };
  let real: string;
  try {
    real = await realpath(f.path);
  } catch {
    return { reason: 'the input file is gone' };
  }
  if (!roots.some((r) => isWithin(real, r))) return { reason: 'not under an input of the run; not copied' };
  let bytes: Buffer;
  try {
    const handle = await open(real, constants.O_RDONLY | constants.O_NOFOLLOW);
    try {
      if (!(await handle.stat()).isFile()) return { reason: 'not a regular file; not copied' };
      bytes = await handle.readFile();
    } finally {
      await handle.close();
    }
  } catch (err) {
    return { reason: fsReason(err) };
  }
  if (createHash('sha256').update(bytes).digest('hex') !== f.sha256) return { reason: 'changed since the run (SHA-256 differs from run.json); not copied' };
  return { bytes };
}

/** The run's input roots (files and folders as given, resolved against its cwd, links resolved). */
async function inputRoots(run: { cwd?: unknown; inputs?: unknown }): Promise<string[]> {
  if (typeof run.cwd !== 'string' || !Array.isArray(run.inputs)) return [];
  const roots: string[] = [];
  for (const i of run.inputs as { path?: unknown; kind?: unknown }[]) {
    if (typeof i?.path !== 'string' || (i.kind !== 'file' && i.kind !== 'folder')) continue;
    try {
      roots.push(await realpath(path.resolve(run.cwd, i.path)));
    } catch {
      // gone: nothing under it can be copied
    }
  }
  return roots;
}

async function runOrganize(runFolder: string, flags: OrganizeFlags, io: CliIo): Promise<number> {
  const dir = path.resolve(io.cwd, runFolder);
  let run: { tool?: string; command?: string; cwd?: unknown; inputs?: unknown; files?: RunFile[]; counts?: { groups?: number } };
  let rows: Record<string, string>[];
  try {
    run = JSON.parse(await readFile(path.join(dir, 'run.json'), 'utf8'));
    rows = parse(await readFile(path.join(dir, 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
  } catch {
    throw new UsageError(`${runFolder} is not an output folder of sheaf group (needs run.json and documents.csv)`);
  }
  if (run.tool !== 'sheaf' || run.command !== 'group' || !Array.isArray(run.files)) {
    throw new UsageError(`${runFolder} is not an output folder of sheaf group (needs run.json and documents.csv)`);
  }
  if (run.files.length === 0) {
    throw new UsageError(`${runFolder} came from rows of an export, not files; there is nothing to copy`);
  }
  const byId = new Map(rows.map((r) => [r.id, r]));
  const docs = run.files.map((f) => ({ id: String(f.id), path: String(f.path), group: byId.get(f.id)?.group ?? '', label: byId.get(f.id)?.label ?? '' }));
  const into = path.resolve(io.cwd, flags.into);
  const steps = organizePlan(into, docs, run.counts?.groups ?? 0);
  const shown = (p: string): string => visible(path.relative(io.cwd, p) || '.');
  if (flags.dryRun) {
    io.stdout.write(steps.map((s) => `${flags.link ? 'link' : 'copy'} ${shown(s.from)} -> ${shown(s.to)}`).join('\n') + '\n');
    io.stdout.write(`${steps.length} file(s) would be ${flags.link ? 'linked' : 'copied'} into ${visible(flags.into)} (dry run: nothing written).\n`);
    return 0;
  }
  const roots = await inputRoots(run);
  let done = 0;
  const skipped: string[] = [];
  await mkdir(into, { recursive: true });
  for (let k = 0; k < steps.length; k++) {
    const s = steps[k];
    const source = await checkedSource(run.files[k], roots);
    if ('reason' in source) {
      skipped.push(`${shown(s.from)}: ${source.reason}`);
      continue;
    }
    const blocked = await makeFolderUnder(into, s.to, shown);
    if (blocked !== null) {
      skipped.push(`${shown(s.to)}: ${blocked}`);
      continue;
    }
    try {
      if (flags.link) {
        await symlink(await realpath(s.from), s.to);
      } else {
        // O_EXCL: never overwrites, and never writes through a link planted at the name.
        const out = await open(s.to, 'wx');
        try {
          await out.writeFile(source.bytes);
        } finally {
          await out.close();
        }
      }
      done++;
    } catch (err) {
      skipped.push(`${shown(s.to)}: ${fsReason(err)}`);
    }
  }
  if (!flags.quiet) for (const line of skipped) io.stderr.write(`sheaf: skipped ${line}\n`);
  io.stdout.write(`${done} file(s) ${flags.link ? 'linked' : 'copied'} into ${visible(flags.into)}${skipped.length ? `; ${skipped.length} skipped` : ''}.\n`);
  return 0;
}
