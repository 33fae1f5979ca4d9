/**
 * Guided groups (`sheaf group --guide FILE`) on a generated pile
 * (helpers/weekly.ts): named groups started from seed terms or example ids keep
 * their names and numbers 0, 1, …; the rest are found freely; documents go to
 * the group they fit best, never forced into a guided one.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { weeklyPile } from './helpers/weekly.js';
import { parseGuide } from '../src/edits/guide.js';

const csv = (file: string) => parse(readFileSync(file), { columns: true, bom: true }) as Record<string, string>[];

describe('sheaf group --guide', () => {
  let dir: string;
  const pile = weeklyPile(3, { heating: 40, billing: 35, parcels: 30, logins: 25, noise: 20, garden: 15 });
  const common = ['group', 'pile.csv', '--text', 'body', '--id', 'ticket_id', '--clean', 'none', '--no-duplicates', '--quiet'];
  // The third logins ticket (rows are numbered across themes in the order above).
  const loginId = `W3-${40 + 35 + 30 + 3}`;

  beforeAll(() => {
    dir = tempDir();
    writeFileSync(path.join(dir, 'pile.csv'), pile.csv);
    writeFileSync(
      path.join(dir, 'guide.json'),
      JSON.stringify({
        format: 'sheaf-guide',
        groups: [
          { name: 'Garden work', terms: ['hedge', 'lawn'] },
          { name: 'Sign-in trouble', examples: [loginId] },
        ],
      }),
    );
  });

  it('starts the named groups from their seeds, numbers them 0 and 1 with their names, finds the rest freely', async () => {
    const run = await sheaf([...common, '--groups', '6', '--guide', 'guide.json', '--out', 'g'], { cwd: dir });
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const rows = csv(path.join(dir, 'g', 'documents.csv'));
    const theme = new Map(rows.map((r) => [r.id, r.theme]));
    expect(theme.get(loginId)).toBe('logins');
    // Group 0 is the garden theme (all 15 and nothing else), group 1 the logins.
    expect(rows.filter((r) => r.group === '0').map((r) => r.theme)).toEqual(Array(15).fill('garden'));
    expect(rows.filter((r) => r.group === '1').map((r) => r.theme)).toEqual(Array(25).fill('logins'));
    expect(rows.filter((r) => r.group === '0').every((r) => r.label === 'Garden work')).toBe(true);
    const groups = JSON.parse(readFileSync(path.join(dir, 'g', 'groups.json'), 'utf8'));
    expect(groups.groups.map((g: { label: string }) => g.label).slice(0, 2)).toEqual(['Garden work', 'Sign-in trouble']);
    // The other four themes are found freely, one group each.
    for (const t of ['heating', 'billing', 'parcels', 'noise']) expect(new Set(rows.filter((r) => r.theme === t).map((r) => r.group)).size).toBe(1);
    const runJson = JSON.parse(readFileSync(path.join(dir, 'g', 'run.json'), 'utf8'));
    expect(runJson.guide.file).toBe('guide.json');
    expect(runJson.guide.groups.map((g: { id: number; label: string; size: number }) => [g.id, g.label, g.size])).toEqual([
      [0, 'Garden work', 15],
      [1, 'Sign-in trouble', 25],
    ]);
    expect(runJson.guide.groups[0].similarity).toBeGreaterThan(0.3);
  });

  it('never forces documents into a guided group they do not fit: every document is filed by the model into its own group', async () => {
    // A guided group seeded with heating and billing words at once: the documents still go to the closest group.
    writeFileSync(path.join(dir, 'odd.json'), JSON.stringify({ format: 'sheaf-guide', groups: [{ name: 'Odd mix', terms: ['boiler', 'invoice'] }] }));
    const run = await sheaf([...common, '--groups', '6', '--guide', 'odd.json', '--out', 'o'], { cwd: dir });
    expect(run.code).toBe(0);
    const a = await sheaf(['assign', 'pile.csv', '--model', 'o/model.json', '--text', 'body', '--id', 'ticket_id', '--clean', 'none', '--out', 'oa', '--quiet'], { cwd: dir });
    expect(a.code).toBe(0);
    const grouped = new Map(csv(path.join(dir, 'o', 'documents.csv')).map((r) => [r.id, r.group]));
    const filed = csv(path.join(dir, 'oa', 'assigned.csv'));
    expect(filed.filter((r) => r.group !== grouped.get(r.id))).toEqual([]);
  });

  it('refuses bad guides with one line (exit 2)', async () => {
    const put = (name: string, doc: unknown) => writeFileSync(path.join(dir, name), JSON.stringify(doc));
    put('unknown.json', { format: 'sheaf-guide', groups: [{ name: 'X', examples: ['nope'] }] });
    const unknown = await sheaf([...common, '--groups', '6', '--guide', 'unknown.json', '--out', 'x'], { cwd: dir });
    expect(unknown.stderr).toBe('sheaf: unknown.json: group 1 (X): no document has the id "nope"\n');
    expect(unknown.code).toBe(2);
    put('three.json', { format: 'sheaf-guide', groups: [{ name: 'A', terms: ['hedge'] }, { name: 'B', terms: ['boiler'] }, { name: 'C', terms: ['parcel'] }] });
    const three = await sheaf([...common, '--groups', '2', '--guide', 'three.json', '--out', 'x'], { cwd: dir });
    expect(three.stderr).toBe('sheaf: three.json names 3 groups; groups is 2: ask for at least as many groups as the guide names\n');
    put('words.json', { format: 'sheaf-guide', groups: [{ name: 'Stars', terms: ['telescope'] }] });
    const words = await sheaf([...common, '--groups', '6', '--guide', 'words.json', '--out', 'x'], { cwd: dir });
    expect(words.stderr).toBe('sheaf: words.json: group 1 (Stars): none of its terms (telescope) is a term of this pile\n');
    const auto = await sheaf([...common, '--groups', 'auto', '--guide', 'guide.json', '--out', 'x'], { cwd: dir });
    expect(auto.stderr).toBe('sheaf: a guide needs method kmeans and a number of groups; got method kmeans and groups auto\n');
    expect(() => parseGuide(JSON.stringify({ format: 'sheaf-guide', groups: [{ name: 'Empty' }] }), 'g.json')).toThrow('g.json: group 1 (Empty) gives no terms and no examples');
  });
});
