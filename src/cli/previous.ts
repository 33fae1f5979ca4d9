/**
 * `--previous` of `sheaf group`: a previous run's model.json (or the run
 * folder holding it), read and checked before any heavy work.
 *
 * @module
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { decimal } from './parse.js';
import { loadModel, modelFileOf } from './model-path.js';
import { UsageError } from '../util/errors.js';
import { previousGroupsOf } from '../continuity/carry.js';
import { parseEdits, type GroupEdits } from '../edits/index.js';
import { parseGuide, type Guide } from '../edits/guide.js';
import { resolveContinuityOptions, type ContinuityOptions, type PreviousGroups } from '../continuity/match.js';

/** The flags involved. */
export interface PreviousFlags {
  previous?: string;
  matchSimilarity?: string;
}

/** The previous run's groups and the matching options, or null without `--previous`. */
export async function previousFromFlags(flags: PreviousFlags, cwd: string): Promise<{ groups: PreviousGroups; options: ContinuityOptions; file: string } | null> {
  const minSimilarity = decimal(flags.matchSimilarity, 'matchSimilarity');
  const options = resolveContinuityOptions(minSimilarity === undefined ? {} : { minSimilarity });
  if (flags.previous === undefined) {
    if (minSimilarity !== undefined) throw new UsageError('--match-similarity needs --previous (the model of the run to continue)', 'matchSimilarity');
    return null;
  }
  const file = await modelFileOf(flags.previous, cwd, 'previous');
  const model = await loadModel(file, cwd, 'previous');
  return { groups: previousGroupsOf(model, file), options, file };
}

/** The flag involved. */
export interface EditsFlags {
  edits?: string;
  guide?: string;
}

/** The edits file of `--edits`, read and parsed (checked against the groups once they are formed), or null. */
export async function editsFromFlags(flags: EditsFlags, cwd: string): Promise<GroupEdits | null> {
  if (flags.edits === undefined) return null;
  let text: string;
  try {
    text = await readFile(path.resolve(cwd, flags.edits), 'utf8');
  } catch (err) {
    const code = (err as { code?: string }).code;
    throw new UsageError(code === 'ENOENT' ? `no such edits file: ${flags.edits}` : `cannot read edits file ${flags.edits} (${code ?? 'error'})`, 'edits');
  }
  return parseEdits(text, flags.edits);
}

/** The guide file of `--guide`, read and parsed (checked against the pile once it is read), or null. */
export async function guideFromFlags(flags: EditsFlags, cwd: string): Promise<Guide | null> {
  if (flags.guide === undefined) return null;
  let text: string;
  try {
    text = await readFile(path.resolve(cwd, flags.guide), 'utf8');
  } catch (err) {
    const code = (err as { code?: string }).code;
    throw new UsageError(code === 'ENOENT' ? `no such guide file: ${flags.guide}` : `cannot read guide file ${flags.guide} (${code ?? 'error'})`, 'guide');
  }
  return parseGuide(text, flags.guide);
}
