/**
 * `sheaf organize`: copies (or links) each input file of a grouping run into
 * a folder per group. Never moves, never overwrites; `--dry-run` shows the plan.
 *
 * @module
 */
import { copyFile, constants, mkdir, readFile, stat, symlink } from 'node:fs/promises';
import path from 'node:path';
import type { Command } from 'commander';
import { parse } from 'csv-parse/sync';
import type { CliIo } from './io.js';
import { UsageError } from '../util/errors.js';

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

async function runOrganize(runFolder: string, flags: OrganizeFlags, io: CliIo): Promise<number> {
  const dir = path.resolve(io.cwd, runFolder);
  let run: { tool?: string; command?: string; files?: { id: string; path: string }[]; counts?: { groups?: number } };
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
  const docs = run.files.map((f) => ({ id: f.id, path: f.path, group: byId.get(f.id)?.group ?? '', label: byId.get(f.id)?.label ?? '' }));
  const into = path.resolve(io.cwd, flags.into);
  const steps = organizePlan(into, docs, run.counts?.groups ?? 0);
  const shown = (p: string): string => path.relative(io.cwd, p) || '.';
  if (flags.dryRun) {
    io.stdout.write(steps.map((s) => `${flags.link ? 'link' : 'copy'} ${shown(s.from)} -> ${shown(s.to)}`).join('\n') + '\n');
    io.stdout.write(`${steps.length} file(s) would be ${flags.link ? 'linked' : 'copied'} into ${flags.into} (dry run: nothing written).\n`);
    return 0;
  }
  let done = 0;
  const skipped: string[] = [];
  for (const s of steps) {
    try {
      await stat(s.from);
    } catch {
      skipped.push(`${shown(s.from)}: the input file is gone`);
      continue;
    }
    await mkdir(path.dirname(s.to), { recursive: true });
    try {
      if (flags.link) await symlink(s.from, s.to);
      else await copyFile(s.from, s.to, constants.COPYFILE_EXCL);
      done++;
    } catch (err) {
      const code = (err as { code?: string }).code;
      skipped.push(`${shown(s.to)}: ${code === 'EEXIST' ? 'already exists (never overwritten)' : code ?? 'failed'}`);
    }
  }
  if (!flags.quiet) for (const line of skipped) io.stderr.write(`sheaf: skipped ${line}\n`);
  io.stdout.write(`${done} file(s) ${flags.link ? 'linked' : 'copied'} into ${flags.into}${skipped.length ? `; ${skipped.length} skipped` : ''}.\n`);
  return 0;
}
