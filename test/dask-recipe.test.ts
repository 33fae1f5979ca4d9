/**
 * The Dask recipe (examples/dask/assign_shards.py): a LocalCluster with two
 * workers maps `sheaf assign --stream jsonl` over shards of a generated export
 * and the gathered rows equal a one-machine run byte for byte. Runs the CLI
 * from dist/ (`npm run build` first). Needs Python 3 with dask.distributed
 * (Debian: python3-distributed, installed by .ci/run); without it the test
 * fails saying what to install. It runs 6,000 rows in 3 shards to stay well under two
 * minutes on a busy machine; the recipe's default is 200,000.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';

const root = path.resolve(__dirname, '..');
const script = path.join(root, 'examples', 'dask', 'assign_shards.py');
const cli = path.join(root, 'dist', 'cli', 'main.js');

/** The first Python on hand that imports dask.distributed (PATH's python3, then Debian's), or null. */
function pythonWithDask(): string | null {
  for (const py of ['python3', '/usr/bin/python3']) {
    const r = spawnSync(py, ['-c', 'import distributed'], { stdio: 'ignore', timeout: 60_000 });
    if (r.status === 0) return py;
  }
  return null;
}

describe('Dask recipe', () => {
  it('gathers the rows of sheaf assign mapped over shards on a two-worker LocalCluster, equal byte for byte to one machine', () => {
    const py = pythonWithDask();
    if (py === null) {
      const where = process.env.CI === 'true' ? 'CI: .ci/run should have installed it' : 'this machine';
      throw new Error(`python3 with dask.distributed is missing (${where}); install it: apt-get install python3-distributed`);
    }
    if (!existsSync(cli)) throw new Error('dist/cli/main.js is missing; run npm run build first');
    const r = spawnSync(py, [script, '--rows', '6000', '--sample', '1500', '--shards', '3', '--workers', '2', '--sheaf', `${process.execPath} ${cli}`], {
      encoding: 'utf8',
      timeout: 110_000,
    });
    expect(r.stderr.split('\n').filter((l) => /DIFFERENT|Traceback|Error/.test(l))).toEqual([]);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/^export: 6000 rows in 3 shards; model fitted on 1500 rows/m);
    expect(r.stdout).toMatch(/^dask: 6000 rows from 3 shards .*; one machine: 6000 rows/m);
    expect(r.stdout).toContain('identical: the gathered rows equal the one-machine run byte for byte');
  }, 120_000);
});
