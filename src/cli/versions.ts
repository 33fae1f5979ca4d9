/**
 * Versions of sheaf and of the packages it runs with, for `run.json`.
 *
 * @module
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

function readJson(file: string): Record<string, unknown> | null {
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
  } catch {
    return null;
  }
}

/** sheaf's own version, Node's, and each runtime dependency's installed version. */
export function versions(): { sheaf: string; node: string; dependencies: Record<string, string> } {
  const own = readJson(path.join(root, 'package.json'));
  const deps = Object.keys((own?.dependencies as Record<string, string> | undefined) ?? {}).sort();
  const dependencies: Record<string, string> = {};
  for (const dep of deps) {
    const pkg = readJson(path.join(root, 'node_modules', dep, 'package.json'));
    dependencies[dep] = typeof pkg?.version === 'string' ? pkg.version : 'unknown';
  }
  return { sheaf: typeof own?.version === 'string' ? own.version : 'unknown', node: process.versions.node, dependencies };
}
