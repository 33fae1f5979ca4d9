/** `sheaf group --unsorted` and `--split-mixed` through the CLI, in-process. */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { sheaf, tempDir } from './helpers/cli.js';

const demoCsv = path.resolve(__dirname, '..', 'corpus-demo', 'tickets.csv');
const base = ['group', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--title', 'subject', '--groups', '8', '--no-duplicates', '--quiet'];

describe('sheaf group --unsorted', () => {
  it('writes unsorted documents with an empty group, the label (unsorted) and their fit, counts them everywhere, and scores them as a class', async () => {
    const out = path.join(tempDir(), 'unsorted');
    const run = await sheaf([...base, '--unsorted', '--truth', 'category', '--out', out]);
    expect(run.code).toBe(0);
    const rows = parse(readFileSync(path.join(out, 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
    const unsorted = rows.filter((r) => r.label === '(unsorted)');
    expect(unsorted.length).toBeGreaterThan(0);
    const groups = JSON.parse(readFileSync(path.join(out, 'groups.json'), 'utf8'));
    expect(groups.unsorted.count).toBe(unsorted.length);
    for (const r of unsorted) {
      expect(r.group).toBe('');
      expect(Number(r.fit)).toBeLessThan(groups.unsorted.threshold);
    }
    expect(groups.groups.reduce((s: number, g: { size: number }) => s + g.size, 0) + unsorted.length).toBe(rows.length);
    expect(run.stdout).toContain(`in 8 groups (unsorted: ${unsorted.length});`);
    // Scored as a class of their own, not left out.
    expect(run.stdout).toContain(`Against "category" (${rows.length} documents): `);
    const r = JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8'));
    expect(r.counts.unsorted).toBe(unsorted.length);
    expect(r.counts.grouped).toBe(rows.length - unsorted.length);
    expect(r.settings.refine).toEqual({ unsorted: true, spread: 2, mixedRatio: 0.8, splitMixed: false });
    const html = readFileSync(path.join(out, 'report.html'), 'utf8');
    expect(html).toContain(`<dt>Unsorted (fit no group well)</dt><dd>${unsorted.length}</dd>`);
  });

  it('without --unsorted nothing is set apart and groups.json says so', async () => {
    const out = path.join(tempDir(), 'sorted');
    const run = await sheaf([...base, '--out', out]);
    expect(run.code).toBe(0);
    const groups = JSON.parse(readFileSync(path.join(out, 'groups.json'), 'utf8'));
    expect(groups.unsorted).toEqual({ count: 0, threshold: null });
    expect(groups.groups.every((g: { mixed: boolean }) => typeof g.mixed === 'boolean')).toBe(true);
    expect(run.stdout).not.toContain('unsorted');
  });

  it('--split-mixed is recorded, and a mixed group is marked in the table', async () => {
    const out = path.join(tempDir(), 'split');
    // Seed 0 at 4 groups on the TF-IDF rows of the texts as written leaves one group much less cohesive than the
    // others (since greedy k-means++ seeding, seed 2 at 8 groups no longer does; see test/unsorted.test.ts).
    const run = await sheaf(['group', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--groups', '4', '--seed', '0', '--no-reduce', '--clean', 'none', '--no-duplicates', '--quiet', '--out', out]);
    expect(run.code).toBe(0);
    const groups = JSON.parse(readFileSync(path.join(out, 'groups.json'), 'utf8'));
    const mixed = groups.groups.filter((g: { mixed: boolean }) => g.mixed);
    expect(mixed.length).toBeGreaterThan(0);
    for (const g of mixed) expect(run.stdout).toContain(`${g.label} (mixed)`);
    const split = await sheaf(['group', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--groups', '4', '--seed', '0', '--no-reduce', '--clean', 'none', '--no-duplicates', '--quiet', '--split-mixed', '--out', out]);
    expect(split.code).toBe(0);
    const after = JSON.parse(readFileSync(path.join(out, 'groups.json'), 'utf8'));
    expect(after.groups.length).toBe(4 + mixed.length);
    expect(JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8')).settings.refine.splitMixed).toBe(true);
  });
});
