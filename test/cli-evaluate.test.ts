/**
 * `sheaf evaluate`: scores from a CSV, checked against the worked example of
 * Manning, Raghavan & Schütze, Introduction to Information Retrieval (2008), §16.3.
 */
import { describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { sheaf, tempDir } from './helpers/cli.js';

/** IIR §16.3, Figure 16.4: cluster 1 holds x×5, o×1; cluster 2 x×1, o×4, ◇×1; cluster 3 x×2, ◇×3. */
function iirCsv(): string {
  const rows: string[] = ['id,group,label,fit,duplicate_set,shape'];
  const put = (group: number, shape: string, count: number): void => {
    for (let i = 0; i < count; i++) rows.push(`${rows.length},${group},,,,${shape}`);
  };
  put(1, 'x', 5);
  put(1, 'o', 1);
  put(2, 'x', 1);
  put(2, 'o', 4);
  put(2, 'd', 1);
  put(3, 'x', 2);
  put(3, 'd', 3);
  return rows.join('\n') + '\n';
}

describe('sheaf evaluate', () => {
  it('reproduces purity and NMI of IIR §16.3 (book values from memory: purity ≈ 0.71, NMI ≈ 0.36)', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'documents.csv'), iirCsv());
    const run = await sheaf(['evaluate', 'documents.csv', '--truth', 'shape', '--json'], { cwd: dir });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const j = JSON.parse(run.stdout);
    expect(j.purity).toBeCloseTo(12 / 17, 6);
    expect(j.nmi).toBeCloseTo(0.3646, 4);
    expect(j.rand_index).toBeCloseTo(92 / 136, 6);
    expect(Object.keys(j)).toEqual(['field', 'scored', 'left_out', 'purity', 'nmi', 'ari', 'v_measure', 'homogeneity', 'completeness', 'rand_index', 'contingency']);
    expect(j.contingency).toEqual([
      { label: 'x', size: 8, groups: [{ group: '1', count: 5 }, { group: '3', count: 2 }, { group: '2', count: 1 }] },
      { label: 'o', size: 5, groups: [{ group: '2', count: 4 }, { group: '1', count: 1 }] },
      { label: 'd', size: 4, groups: [{ group: '3', count: 3 }, { group: '2', count: 1 }] },
    ]);
  });

  it('prints the scores and where each label went', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'documents.csv'), iirCsv());
    const run = await sheaf(['evaluate', 'documents.csv', '--truth', 'shape'], { cwd: dir });
    expect(run.code).toBe(0);
    const lines = run.stdout.split('\n');
    expect(lines[0]).toBe('Against "shape" (17 documents): purity 0.706  NMI 0.365  ARI 0.243  V-measure 0.365'); // scikit-learn's adjusted_rand_score on these labels: 0.242915
    expect(lines[3]).toBe('x         8  group 1: 5 (63%), group 3: 2 (25%), group 2: 1 (13%)');
  });

  it('leaves out rows with no group, and says so', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'd.csv'), 'id,group,topic\n1,0,a\n2,0,a\n3,,a\n4,1,b\n5,1,\n');
    const run = await sheaf(['evaluate', 'd.csv', '--truth', 'topic', '--json'], { cwd: dir });
    const j = JSON.parse(run.stdout);
    expect(j.scored).toBe(3);
    expect(j.left_out).toBe(2);
    expect(j.purity).toBe(1);
    expect(j.nmi).toBe(1);
  });

  it('names a missing column and lists the ones there are', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'd.csv'), 'id,group,topic\n1,0,a\n');
    const run = await sheaf(['evaluate', 'd.csv', '--truth', 'category'], { cwd: dir });
    expect(run.stderr).toBe('sheaf: d.csv has no column "category" for --truth; its columns are: id, group, topic\n');
    expect(run.code).toBe(2);
    const missing = await sheaf(['evaluate', 'nope.csv', '--truth', 'x'], { cwd: dir });
    expect(missing.stderr).toBe('sheaf: no such file: nope.csv\n');
    expect(missing.code).toBe(2);
  });
});
