/**
 * A person's edits (`sheaf group --edits FILE`): rename, merge, split into n,
 * pin name terms, on generated weekly piles (helpers/weekly.ts); exact
 * one-line refusals.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { weeklyPile } from './helpers/weekly.js';
import { csrFromDense } from './helpers/csr.js';
import { applyEdits, parseEdits } from '../src/edits/index.js';
import { modelFromJson } from '../src/model/index.js';

const csv = (file: string) => parse(readFileSync(file), { columns: true, bom: true }) as Record<string, string>[];
const groupOf = (rows: Record<string, string>[], theme: string): string => {
  const counts = new Map<string, number>();
  for (const r of rows) if (r.theme === theme) counts.set(r.group, (counts.get(r.group) ?? 0) + 1);
  return [...counts].sort((a, b) => b[1] - a[1])[0]![0];
};

describe('applyEdits (library)', () => {
  // Rows 0–2 in group 0, row 3 alone in group 1, rows 4–5 in group 2.
  const m = csrFromDense([[1, 0, 0], [1, 0.1, 0], [1, 0, 0.1], [0, 1, 0], [0, 0, 1], [0, 0.1, 1]]);
  const p = { groups: 3, assignments: Int32Array.from([0, 0, 0, 1, 2, 2]) };
  const edits = (list: unknown[]) => parseEdits(JSON.stringify({ format: 'sheaf-edits', edits: list }), 'e.json');

  it('refuses an unknown group, a merge with itself and a split of a 1-document group, with one exact line each', () => {
    expect(() => applyEdits(edits([{ rename: 7, name: 'x' }]), m, p, { seed: 1 })).toThrow('e.json: edit 1: unknown group 7 (this run has groups 0 to 2)');
    expect(() => applyEdits(edits([{ rename: 0, name: 'x' }, { merge: [2, 2] }]), m, p, { seed: 1 })).toThrow('e.json: edit 2: merge of group 2 with itself');
    expect(() => applyEdits(edits([{ split: 1, into: 2 }]), m, p, { seed: 1 })).toThrow('e.json: edit 1: cannot split group 1 into 2: it has 1 document');
    expect(() => applyEdits(edits([{ merge: [0, 2] }, { split: 2, into: 2 }]), m, p, { seed: 1 })).toThrow('e.json: edit 2: group 2 is both merged and split; give one of the two');
    expect(() => parseEdits('[]', 'e.json')).toThrow('e.json is not a sheaf edits file: it is an object { "format": "sheaf-edits", "edits": [ … ] }');
    expect(() => edits([{ rename: 0 }])).toThrow(
      'e.json: edit 1 is not one of { "rename": N, "name": "…" }, { "merge": [N, M, …] }, { "split": N, "into": 2+ }, { "pin": N, "use": ["…"], "avoid": ["…"] }',
    );
  });

  it('merges into the lowest number and fills the freed number with the highest', () => {
    const out = applyEdits(edits([{ merge: [2, 0] }, { rename: 2, name: 'merged' }]), m, p, { seed: 1 });
    expect(out.groups).toBe(2);
    expect(Array.from(out.assignments)).toEqual([0, 0, 0, 1, 0, 0]);
    expect(out.numbers).toEqual([[0], [1], [0]]);
    expect(out.names).toEqual(new Map([[0, 'merged']]));
  });

  it('splits a group with k-means on its rows only: the largest part keeps the number, the other takes the next', () => {
    const out = applyEdits(edits([{ split: 0, into: 2 }]), m, { groups: 3, assignments: Int32Array.from([0, 0, 0, 1, 0, 0]) }, { seed: 1 });
    expect(out.groups).toBe(4);
    // Rows 0–2 (term 0) and rows 4–5 (term 2) part; row 3 keeps group 1.
    expect(Array.from(out.assignments)).toEqual([0, 0, 0, 1, 3, 3]);
    expect(out.numbers).toEqual([[0, 3], [1], [2]]);
  });
});

describe('sheaf group --edits on a generated pile', () => {
  let dir: string;
  const pile = weeklyPile(1, { heating: 40, billing: 35, parcels: 30, logins: 25, noise: 20 });
  const common = ['group', 'week1.csv', '--text', 'body', '--id', 'ticket_id', '--clean', 'none', '--no-duplicates', '--quiet'];
  let before: Record<string, string>[];
  let four: Record<string, string>[];

  beforeAll(async () => {
    dir = tempDir();
    writeFileSync(path.join(dir, 'week1.csv'), pile.csv);
    expect((await sheaf([...common, '--groups', '5', '--out', 'w1'], { cwd: dir })).code).toBe(0);
    before = csv(path.join(dir, 'w1', 'documents.csv'));
    expect((await sheaf([...common, '--groups', '4', '--out', 'w4'], { cwd: dir })).code).toBe(0);
    four = csv(path.join(dir, 'w4', 'documents.csv'));
  });

  it('renames, merges and pins: documents.csv, groups.json, model.json and run.json follow', async () => {
    const heating = groupOf(before, 'heating');
    const logins = Number(groupOf(before, 'logins'));
    const noise = Number(groupOf(before, 'noise'));
    const billing = Number(groupOf(before, 'billing'));
    writeFileSync(
      path.join(dir, 'edits.json'),
      JSON.stringify({
        format: 'sheaf-edits',
        edits: [
          { rename: Number(heating), name: 'Boilers and radiators' },
          { merge: [logins, noise] },
          { pin: billing, use: ['urgent'], avoid: ['refund'] },
        ],
      }),
    );
    const run = await sheaf([...common, '--groups', '5', '--edits', 'edits.json', '--out', 'e'], { cwd: dir });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const rows = csv(path.join(dir, 'e', 'documents.csv'));
    const groups = JSON.parse(readFileSync(path.join(dir, 'e', 'groups.json'), 'utf8'));
    expect(groups.groups).toHaveLength(4);
    const merged = groupOf(rows, 'logins');
    expect(groupOf(rows, 'noise')).toBe(merged);
    expect(groups.groups[Number(merged)].size).toBe(45);
    expect(Number(merged)).toBe(Math.min(logins, noise));
    expect(groupOf(rows, 'heating')).toBe(heating);
    expect(groups.groups[Number(heating)].label).toBe('Boilers and radiators');
    expect(rows.filter((r) => r.theme === 'heating').every((r) => r.label === 'Boilers and radiators')).toBe(true);
    const billingLabel: string = groups.groups[Number(groupOf(rows, 'billing'))].label;
    expect(billingLabel.split(' · ')[0]).toBe('urgent');
    expect(billingLabel).not.toContain('refund');
    const model = modelFromJson(readFileSync(path.join(dir, 'e', 'model.json'), 'utf8'));
    expect(model.groups).toBe(4);
    expect(model.labels[Number(heating)]!.label).toBe('Boilers and radiators');
    expect(model.edits).toHaveLength(3);
    const runJson = JSON.parse(readFileSync(path.join(dir, 'e', 'run.json'), 'utf8'));
    expect(runJson.edits.file).toBe('edits.json');
    expect(runJson.edits.numbers[noise]).toEqual([Math.min(logins, noise)]);
  });

  it('splits a group holding two themes into 2: the themes part', async () => {
    // With 4 groups for 5 themes one group holds two; find it and split it.
    const themesOf = new Map<string, Set<string>>();
    for (const r of four) themesOf.set(r.group, (themesOf.get(r.group) ?? new Set()).add(r.theme));
    const mixed = [...themesOf].find(([, t]) => t.size >= 2)![0];
    const [a, b] = [...themesOf.get(mixed)!].sort((x, y) => four.filter((r) => r.theme === y).length - four.filter((r) => r.theme === x).length);
    writeFileSync(path.join(dir, 'split.json'), JSON.stringify({ format: 'sheaf-edits', edits: [{ split: Number(mixed), into: 2 }] }));
    const run = await sheaf([...common, '--groups', '4', '--edits', 'split.json', '--out', 's'], { cwd: dir });
    expect(run.code).toBe(0);
    const rows = csv(path.join(dir, 's', 'documents.csv'));
    expect(new Set(rows.map((r) => r.group)).size).toBe(5);
    expect(groupOf(rows, a!)).toBe(mixed);
    expect(groupOf(rows, b!)).toBe('4');
    // Documents outside the split group keep their groups.
    const was = new Map(four.map((r) => [r.id, r.group]));
    expect(rows.filter((r) => was.get(r.id) !== mixed).every((r) => r.group === was.get(r.id))).toBe(true);
  });

  it('refuses an unknown group and a merge with itself on the command line (exit 2, one line)', async () => {
    writeFileSync(path.join(dir, 'bad.json'), JSON.stringify({ format: 'sheaf-edits', edits: [{ merge: [1, 9] }] }));
    const bad = await sheaf([...common, '--groups', '5', '--edits', 'bad.json', '--out', 'x'], { cwd: dir });
    expect(bad.stderr).toBe('sheaf: bad.json: edit 1: unknown group 9 (this run has groups 0 to 4)\n');
    expect(bad.code).toBe(2);
    writeFileSync(path.join(dir, 'self.json'), JSON.stringify({ format: 'sheaf-edits', edits: [{ merge: [3, 3] }] }));
    const self = await sheaf([...common, '--groups', '5', '--edits', 'self.json', '--out', 'x'], { cwd: dir });
    expect(self.stderr).toBe('sheaf: self.json: edit 1: merge of group 3 with itself\n');
    const none = await sheaf([...common, '--groups', '5', '--edits', 'none.json', '--out', 'x'], { cwd: dir });
    expect(none.stderr).toBe('sheaf: no such edits file: none.json\n');
    expect(none.code).toBe(2);
  });
});
