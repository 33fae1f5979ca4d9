/**
 * Continuity across runs: the optimal one-to-one assignment against SciPy's
 * linear_sum_assignment (fixture made by test/fixtures/continuity/make_assignment.py),
 * and `sheaf group --previous` on generated weekly piles (helpers/weekly.ts):
 * a theme appearing in week 2, one vanishing, one growing, one shrinking.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { weeklyPile } from './helpers/weekly.js';
import { optimalAssignment } from '../src/continuity/assignment.js';
import { matchGroups, resolveContinuityOptions, type PreviousGroups } from '../src/continuity/match.js';
import { continuityHtml } from '../src/report/continuity.js';

const fixture = JSON.parse(readFileSync(path.join(__dirname, 'fixtures', 'continuity', 'assignment.json'), 'utf8')) as {
  cases: { rows: number; cols: number; kind: string; cost: number[]; rowInd: number[]; colInd: number[]; total: number }[];
};

describe('optimalAssignment (Hungarian method, Kuhn 1955) against scipy.optimize.linear_sum_assignment', () => {
  it(`gives SciPy's pairs and total on all ${fixture.cases.length} fixture matrices (square and rectangular)`, () => {
    expect(fixture.cases.length).toBe(30);
    for (const c of fixture.cases) {
      const got = optimalAssignment(Float64Array.from(c.cost), c.rows, c.cols);
      expect(Array.from(got.rows), `${c.rows}×${c.cols} ${c.kind}`).toEqual(c.rowInd);
      expect(Array.from(got.cols), `${c.rows}×${c.cols} ${c.kind}`).toEqual(c.colInd);
      expect(got.total).toBeCloseTo(c.total, 9);
    }
  });

  it('finds the hand-worked optimum of a 3 × 3 example and refuses bad input', () => {
    // Rows 0,1,2 → columns 1,0,2: 1 + 2 + 2 = 5 is the least of the six permutations (checked by hand).
    const got = optimalAssignment(Float64Array.from([4, 1, 3, 2, 0, 5, 3, 2, 2]), 3, 3);
    expect(Array.from(got.cols)).toEqual([1, 0, 2]);
    expect(got.total).toBe(5);
    expect(() => optimalAssignment(Float64Array.from([1, 2]), 2, 2)).toThrow('cost holds 2 values; 2 × 2 needs 4');
    expect(() => optimalAssignment(Float64Array.from([1, Infinity]), 1, 2)).toThrow('cost[1] is Infinity; every cost must be finite');
    expect(optimalAssignment(new Float64Array(0), 0, 3).rows.length).toBe(0);
  });
});

describe('matchGroups', () => {
  // Three old groups on terms a, b, c (one term each); four new groups: b, a, d and a mix of c and d.
  const previous: PreviousGroups = {
    source: 'old.json',
    groups: 3,
    terms: ['a', 'b', 'c'],
    centroids: Float32Array.from([1, 0, 0, 0, 1, 0, 0, 0, 1]),
    labels: [
      { id: 0, label: 'alpha', size: 10 },
      { id: 1, label: 'beta', size: 10 },
      { id: 2, label: 'gamma', size: 10 },
    ],
  };
  const s = Math.SQRT1_2;
  // Current terms b, a, d, c; term-major with 4 groups.
  const centroids = Float32Array.from([1, 0, 0, 0, /* a */ 0, 1, 0, 0, /* d */ 0, 0, 1, s, /* c */ 0, 0, 0, s]);

  it('continues close matches with their numbers, numbers the rest from the lowest free one, reports gone groups', () => {
    const c = matchGroups(previous, { centroids, terms: ['b', 'a', 'd', 'c'], groups: 4, sizes: Int32Array.from([10, 30, 10, 10]) }, resolveContinuityOptions());
    // Formed 0 (b) continues beta (1), formed 1 (a) continues alpha (0); formed 3 (c and d) matches gamma at 0.7071 ≥ 0.5.
    expect(Array.from(c.renumber)).toEqual([1, 0, 3, 2]);
    expect(c.groups.map((g) => [g.id, g.change, g.previous?.label ?? null, g.similarity])).toEqual([
      [0, 'grown', 'alpha', 1],
      [1, 'shrunk', 'beta', 1],
      [2, 'shrunk', 'gamma', 0.707107],
      [3, 'new', null, null],
    ]);
    expect(c.gone).toEqual([]);
    // At 0.8 gamma is not continued: gone, and its best match 0.7071 is reported.
    const strict = matchGroups(previous, { centroids, terms: ['b', 'a', 'd', 'c'], groups: 4, sizes: Int32Array.from([10, 10, 10, 10]) }, resolveContinuityOptions({ minSimilarity: 0.8 }));
    expect(strict.gone).toEqual([{ id: 2, label: 'gamma', size: 10, closest: 0.707107 }]);
    expect(Array.from(strict.renumber)).toEqual([1, 0, 2, 3]);
    expect(continuityHtml(strict, (id) => `<g${id}>`)).toContain('<td>&lt;g3&gt;</td><td>new</td>');
  });

  it('refuses bad options with one line', () => {
    expect(() => resolveContinuityOptions({ minSimilarity: 1.5 })).toThrow('matchSimilarity must be a number from 0 to 1; got 1.5');
    expect(() => resolveContinuityOptions({ sizeChange: 0 })).toThrow('sizeChange must be a number above 0; got 0');
  });
});

describe('sheaf group --previous on generated weekly piles', () => {
  const csv = (file: string) => parse(readFileSync(file), { columns: true, bom: true }) as Record<string, string>[];
  let dir: string;
  let w1: Record<string, string>[];
  let w1groups: { groups: { id: number; label: string; size: number }[] };
  let run2: { code: number; stdout: string; stderr: string };
  // Week 1: five themes. Week 2: logins grows, heating shrinks, noise vanishes, garden appears.
  const week1 = weeklyPile(1, { heating: 40, billing: 35, parcels: 30, logins: 25, noise: 20 });
  const week2 = weeklyPile(2, { logins: 60, billing: 45, garden: 45, parcels: 40, heating: 20 });
  const groupOf = (rows: Record<string, string>[], theme: string): string => {
    const counts = new Map<string, number>();
    for (const r of rows) if (r.theme === theme) counts.set(r.group, (counts.get(r.group) ?? 0) + 1);
    return [...counts].sort((a, b) => b[1] - a[1])[0]![0];
  };

  beforeAll(async () => {
    dir = tempDir();
    writeFileSync(path.join(dir, 'week1.csv'), week1.csv);
    writeFileSync(path.join(dir, 'week2.csv'), week2.csv);
    const common = ['--text', 'body', '--id', 'ticket_id', '--groups', '5', '--clean', 'none', '--no-duplicates', '--quiet'];
    const run1 = await sheaf(['group', 'week1.csv', ...common, '--out', 'w1'], { cwd: dir });
    expect(run1.code).toBe(0);
    w1 = csv(path.join(dir, 'w1', 'documents.csv'));
    w1groups = JSON.parse(readFileSync(path.join(dir, 'w1', 'groups.json'), 'utf8'));
    run2 = await sheaf(['group', 'week2.csv', ...common, '--previous', 'w1', '--out', 'w2'], { cwd: dir });
  });

  it('keeps the numbers and names of the themes that continue, in documents.csv, groups.json, tree.nwk and model.json', () => {
    expect(run2.stderr).toBe('');
    expect(run2.code).toBe(0);
    const w2 = csv(path.join(dir, 'w2', 'documents.csv'));
    const groups2 = JSON.parse(readFileSync(path.join(dir, 'w2', 'groups.json'), 'utf8'));
    const model2 = JSON.parse(readFileSync(path.join(dir, 'w2', 'model.json'), 'utf8'));
    const tree2 = readFileSync(path.join(dir, 'w2', 'tree.nwk'), 'utf8');
    for (const theme of ['heating', 'billing', 'parcels', 'logins']) {
      const id = groupOf(w1, theme);
      expect(groupOf(w2, theme), theme).toBe(id);
      const oldLabel = w1groups.groups[Number(id)]!.label;
      expect(groups2.groups[Number(id)].label).toBe(oldLabel);
      expect(model2.labels[Number(id)].label).toBe(oldLabel);
      expect(w2.filter((r) => r.group === id).every((r) => r.label === oldLabel)).toBe(true);
      expect(tree2).toContain(`'${id} ${oldLabel}'`);
    }
    // The new theme takes the number the gone one left free (noise was the smallest group of week 1: 4).
    expect(groupOf(w1, 'noise')).toBe('4');
    expect(groupOf(w2, 'garden')).toBe('4');
    // Group sizes follow the carried numbers.
    for (const g of groups2.groups) expect(w2.filter((r) => r.group === String(g.id)).length).toBe(g.size);
  });

  it('files week 2 again with its own model into the same numbers (the model uses the carried numbers)', async () => {
    const a = await sheaf(['assign', 'week2.csv', '--model', 'w2/model.json', '--text', 'body', '--id', 'ticket_id', '--clean', 'none', '--out', 'a2', '--quiet'], { cwd: dir });
    expect(a.code).toBe(0);
    const w2 = new Map(csv(path.join(dir, 'w2', 'documents.csv')).map((r) => [r.id, r.group]));
    const assigned = csv(path.join(dir, 'a2', 'assigned.csv'));
    expect(assigned.filter((r) => r.group === w2.get(r.id)).length).toBe(assigned.length);
  });

  it('reports continued, grown, shrunk, new and gone with sizes in run.json and the terminal', () => {
    const run = JSON.parse(readFileSync(path.join(dir, 'w2', 'run.json'), 'utf8'));
    const c = run.continuity;
    expect(c.previous).toBe(path.join('w1', 'model.json'));
    expect(c.matchSimilarity).toBe(0.5);
    expect(c.counts).toEqual({ continued: 2, grown: 1, shrunk: 1, new: 1, gone: 1 });
    const byTheme = (theme: string) => c.groups.find((g: { id: number }) => String(g.id) === groupOf(csv(path.join(dir, 'w2', 'documents.csv')), theme));
    expect(byTheme('logins')).toMatchObject({ change: 'grown', size: 60, previous: { size: 25 } });
    expect(byTheme('heating')).toMatchObject({ change: 'shrunk', size: 20, previous: { size: 40 } });
    expect(byTheme('billing')).toMatchObject({ change: 'continued', size: 45, previous: { size: 35 } });
    expect(byTheme('garden')).toMatchObject({ change: 'new', size: 45, previous: null });
    expect(byTheme('logins').similarity).toBeGreaterThan(0.9);
    const noise = w1groups.groups[4]!;
    expect(c.gone).toHaveLength(1);
    expect(c.gone[0]).toMatchObject({ id: 4, label: noise.label, size: 20 });
    expect(c.gone[0].closest).toBeLessThan(0.5);
    expect(run2.stdout).toContain(`Since the previous run (${path.join('w1', 'model.json')}): 4 continued (1 grown, 1 shrunk), 1 new, 1 gone.`);
    expect(run2.stdout).toContain(`  gone    4 ${noise.label} (20)`);
    // The report has the same view: a nav entry, and one table row per group plus the gone one.
    const html = readFileSync(path.join(dir, 'w2', 'report.html'), 'utf8');
    expect(html).toContain('<li><a href="#since">Since last run</a></li>');
    const section = html.slice(html.indexOf('<section class="view" id="since"'), html.indexOf('</section>', html.indexOf('id="since"')));
    expect((section.match(/<tr><td>/g) ?? []).length).toBe(c.groups.length + 1);
    expect(section).toContain(`<td></td><td>${noise.label}</td><td>gone</td><td>4 ${noise.label}</td><td>20</td><td>0</td>`);
  });

  it('refuses bad --previous and --match-similarity with one line (exit 2)', async () => {
    const common = ['group', 'week2.csv', '--text', 'body', '--groups', '5', '--out', 'x'];
    const bad = await sheaf([...common, '--previous', 'w1', '--match-similarity', '2'], { cwd: dir });
    expect(bad.stderr).toBe('sheaf: --match-similarity must be a number from 0 to 1; got 2\n');
    expect(bad.code).toBe(2);
    const alone = await sheaf([...common, '--match-similarity', '0.7'], { cwd: dir });
    expect(alone.stderr).toBe('sheaf: --match-similarity needs --previous (the model of the run to continue)\n');
    const missing = await sheaf([...common, '--previous', 'nowhere'], { cwd: dir });
    // The same lines as --model gives (one function finds the model file for both flags).
    expect(missing.stderr).toBe('sheaf: no such model file: nowhere\n');
    expect(missing.code).toBe(2);
    const empty = await sheaf([...common, '--previous', '.'], { cwd: dir });
    expect(empty.stderr).toBe('sheaf: --previous . is a folder with no model.json in it; name a model.json written by sheaf group, or the output folder of that run\n');
  });
});
