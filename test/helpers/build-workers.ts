/**
 * Worker threads cannot load TypeScript, and vitest runs the suites from
 * source: this compiles the given modules (and what they import) with the
 * project's build settings into a temporary folder laid out like dist/, with a
 * package.json marking ESM and a link to node_modules, and returns the folder.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));

/** Compiles `files` (paths relative to the repository root) into a fresh temporary folder; returns it. */
export function buildForWorkers(prefix: string, files: readonly string[]): string {
  const outDir = mkdtempSync(join(tmpdir(), prefix));
  const config = join(outDir, 'tsconfig.json');
  writeFileSync(
    config,
    JSON.stringify({
      extends: join(root, 'tsconfig.build.json'),
      compilerOptions: {
        rootDir: join(root, 'src'),
        outDir: join(outDir, 'dist'),
        typeRoots: [join(root, 'node_modules/@types')],
        declaration: false,
        sourceMap: false,
      },
      include: [],
      // The ambient declarations (every .d.ts under src/: modules without types of their own) go along, whatever the files import.
      files: [...files.map((f) => join(root, f)), ...ambientDeclarations()],
    }),
  );
  execFileSync(process.execPath, [join(root, 'node_modules/typescript/bin/tsc'), '-p', config], { stdio: 'pipe' });
  writeFileSync(join(outDir, 'package.json'), '{"type":"module"}\n');
  symlinkSync(join(root, 'node_modules'), join(outDir, 'node_modules'), 'dir');
  return outDir;
}

/** The project's ambient declaration files (every `.d.ts` under src/), absolute. */
function ambientDeclarations(): string[] {
  const src = join(root, 'src');
  return (readdirSync(src, { recursive: true }) as string[]).filter((f) => f.endsWith('.d.ts')).map((f) => join(src, f));
}
