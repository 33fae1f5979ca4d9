/**
 * `--model` may name the model file or the output folder of the run that
 * wrote it: a folder is looked into for `model.json`; {@link loadModel} reads
 * and checks the model it names.
 *
 * @module
 */
import { readFile, stat } from 'node:fs/promises';
import path from 'node:path';
import { UsageError } from '../util/errors.js';
import { modelFromJson, type Model } from '../model/index.js';

/** The file name `sheaf group` gives the saved model in its output folder. */
export const MODEL_FILE = 'model.json';

/** The flags that name a model file or a run folder. */
export type ModelFlag = 'model' | 'previous';

/**
 * The model file `given` names (relative to `cwd`, as given): `given` itself,
 * or `given/model.json` when `given` is a folder. A folder without one is
 * refused with a {@link UsageError} naming `flag`; a missing path is left for
 * the reader to report.
 */
export async function modelFileOf(given: string, cwd: string, flag: ModelFlag = 'model'): Promise<string> {
  let folder = false;
  try {
    folder = (await stat(path.resolve(cwd, given))).isDirectory();
  } catch {
    return given;
  }
  if (!folder) return given;
  const inside = path.join(given, MODEL_FILE);
  try {
    if ((await stat(path.resolve(cwd, inside))).isFile()) return inside;
  } catch {
    // refused below
  }
  throw new UsageError(`--${flag} ${given} is a folder with no ${MODEL_FILE} in it; name a model.json written by sheaf group, or the output folder of that run`, flag);
}

/** Reads and checks a model file (one clear line when it is missing, foreign or damaged); `flag` is the flag that named it. */
export async function loadModel(given: string, cwd: string, flag: ModelFlag = 'model'): Promise<Model> {
  const file = await modelFileOf(given, cwd, flag); // a run folder: its model.json
  let text: string;
  try {
    text = await readFile(path.resolve(cwd, file), 'utf8');
  } catch (err) {
    const code = (err as { code?: string }).code;
    throw new UsageError(code === 'ENOENT' ? `no such model file: ${file}` : `cannot read model file ${file} (${code ?? 'error'})`, flag);
  }
  return modelFromJson(text, file);
}
