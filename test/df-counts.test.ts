/**
 * Mergeable document-frequency counts: any split into shards, counted and
 * merged in any order and grouping, equals counting everything at once; the
 * idf a sample takes from merged counts equals the idf of a fit on the whole
 * collection; the CLI commands and `group --term-counts`.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { countTerms, mergeTermCounts, termCountsFromJson, termCountsToJson, type TermCounts } from '../src/vectorize/df-counts.js';
import { resolveAnalyzerOptions } from '../src/analyze/index.js';
import { fitTfidf } from '../src/vectorize/index.js';
import { resolveVectorizeOptions } from '../src/vectorize/options.js';
import { modelFromJson } from '../src/model/index.js';

const analyzer = resolveAnalyzerOptions({});
const plain = (c: TermCounts) => ({ documents: c.documents, terms: [...c.terms], df: Array.from(c.df) });

/** Naive reference: for every term, the number of documents whose list contains it. */
function naiveCounts(docs: string[][]): { documents: number; terms: string[]; df: number[] } {
  const terms = [...new Set(docs.flat())].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  return { documents: docs.length, terms, df: terms.map((t) => docs.filter((d) => d.includes(t)).length) };
}

const docsArb = fc.array(fc.array(fc.constantFrom('pump', 'tank', 'leak', 'key', 'door', 'wifi', 'bill', 'zz', 'Ä', '__proto__'), { maxLength: 6 }), { minLength: 1, maxLength: 40 });

describe('term counts', () => {
  it('merged shard counts equal counting everything at once, whatever the split and the merge order (fast-check)', () => {
    fc.assert(
      fc.property(docsArb, fc.array(fc.nat(), { maxLength: 6 }), fc.array(fc.nat(), { maxLength: 8 }), (docs, cutsRaw, order) => {
        const cuts = [...new Set(cutsRaw.map((c) => c % (docs.length + 1)))].sort((a, b) => a - b);
        const at = [0, ...cuts, docs.length];
        let shards = at.slice(1).map((end, i) => countTerms(docs.slice(at[i], end), analyzer, 'tickets'));
        // Merge pairs chosen by `order` until one is left (any tree shape, any order).
        let k = 0;
        while (shards.length > 1) {
          const i = (order[k++ % Math.max(order.length, 1)] ?? 0) % shards.length;
          const j = (i + 1 + ((order[k % Math.max(order.length, 1)] ?? 0) % (shards.length - 1))) % shards.length;
          const merged = mergeTermCounts(shards[i], shards[j]);
          shards = shards.filter((_, x) => x !== i && x !== j).concat([merged]);
        }
        const whole = countTerms(docs, analyzer, 'tickets');
        expect(plain(shards[0])).toEqual(plain(whole));
        expect(plain(whole)).toEqual(naiveCounts(docs));
        expect(termCountsToJson(shards[0])).toBe(termCountsToJson(whole));
      }),
      { numRuns: 300, seed: 42 },
    );
  });

  it('merging is associative and commutative (fast-check)', () => {
    fc.assert(
      fc.property(docsArb, docsArb, docsArb, (x, y, z) => {
        const [a, b, c] = [x, y, z].map((d) => countTerms(d, analyzer, 'none'));
        const left = mergeTermCounts(mergeTermCounts(a, b), c);
        const right = mergeTermCounts(a, mergeTermCounts(b, c));
        expect(plain(left)).toEqual(plain(right));
        expect(plain(mergeTermCounts(a, b))).toEqual(plain(mergeTermCounts(b, a)));
      }),
      { numRuns: 200, seed: 7 },
    );
  });

  it('refuses to merge counts made with other analyzer or cleaning settings', () => {
    const a = countTerms([['pump']], analyzer, 'tickets');
    const b = countTerms([['pump']], resolveAnalyzerOptions({ stem: false }), 'tickets');
    expect(() => mergeTermCounts(a, b, ['a.json', 'b.json'])).toThrow('a.json and b.json were counted with different analyzer settings (stem true vs false); they cannot be merged');
    const c = countTerms([['pump']], analyzer, 'none');
    expect(() => mergeTermCounts(a, c, ['a.json', 'c.json'])).toThrow('a.json and c.json were counted with different cleaning (tickets vs none); they cannot be merged');
  });

  it('reads back what it writes and refuses damaged files with one line', () => {
    const c = countTerms([['pump', 'tank'], ['pump']], analyzer, 'tickets');
    const text = termCountsToJson(c);
    expect(plain(termCountsFromJson(text))).toEqual({ documents: 2, terms: ['pump', 'tank'], df: [2, 1] });
    const raw = JSON.parse(text);
    expect(() => termCountsFromJson(JSON.stringify({ ...raw, df: [3, 1] }), 'c.json')).toThrow('c.json is damaged: df of "pump" is 3, above the 2 documents');
    expect(() => termCountsFromJson(JSON.stringify({ ...raw, terms: ['tank', 'pump'] }), 'c.json')).toThrow('c.json is damaged: terms are not unique and in order at "pump" (position 2)');
    expect(() => termCountsFromJson(JSON.stringify({ ...raw, extra: 1 }), 'c.json')).toThrow('c.json is damaged: (top level): unexpected field(s) "extra"');
    expect(() => termCountsFromJson('{}', 'c.json')).toThrow('c.json is not a sheaf term-counts file (no "format": "sheaf-term-counts")');
  });

  it('a sample fitted with the whole collection’s counts gets the idf a fit on the whole collection gives', () => {
    const docs = [['pump', 'tank'], ['pump', 'leak'], ['door', 'key'], ['door', 'pump'], ['wifi'], ['wifi', 'bill'], ['bill', 'pump']];
    const whole = fitTfidf(docs, { minDf: 1 });
    const sample = docs.slice(0, 3);
    const fitted = fitTfidf(sample, { minDf: 1, idfCounts: countTerms(docs, analyzer, 'tickets') });
    expect(fitted.vocabulary.docCount).toBe(7);
    expect([...fitted.vocabulary.terms]).toEqual(['door', 'key', 'leak', 'pump', 'tank']);
    for (const [j, t] of fitted.vocabulary.terms.entries()) {
      const w = whole.vocabulary.index.get(t) as number;
      expect(fitted.vocabulary.df[j]).toBe(whole.vocabulary.df[w]);
      expect(fitted.vocabulary.idf[j]).toBe(whole.vocabulary.idf[w]);
    }
    // Smoothed idf, ln((1 + n) / (1 + df)) + 1 (scikit-learn's TfidfVectorizer smooth_idf, common practice): pump is in 4 of 7.
    expect(fitted.vocabulary.idf[3]).toBeCloseTo(Math.log(8 / 5) + 1, 12);
    expect(() => fitTfidf(docs, { idfCounts: countTerms(sample, analyzer, 'tickets') })).toThrow('idfCounts cover 3 documents, fewer than the 7 being fitted');
    expect(() => resolveVectorizeOptions({ idfCounts: 5 as never })).toThrow('idfCounts must be term counts (documents, terms, df); got 5');
  });
});

describe('sheaf count-terms, merge-counts and group --term-counts', () => {
  const root = path.resolve(__dirname, '..');
  const records = parse(readFileSync(path.join(root, 'corpus-demo', 'tickets.csv')), { bom: true }) as string[][];
  const header = records[0];
  const quote = (c: string) => (/[",\r\n]/.test(c) ? `"${c.replace(/"/g, '""')}"` : c);
  const csvOf = (rs: string[][]) => [header, ...rs].map((r) => r.map(quote).join(',')).join('\n') + '\n';

  it('counts of three shards merged in any order are the bytes of counting the whole export; group takes its idf from them', async () => {
    const dir = tempDir();
    const rows = records.slice(1);
    writeFileSync(path.join(dir, 'all.csv'), csvOf(rows));
    const cuts = [0, 100, 310, rows.length];
    for (let s = 0; s < 3; s++) writeFileSync(path.join(dir, `s${s}.csv`), csvOf(rows.slice(cuts[s], cuts[s + 1])));
    const t = ['--text', 'subject,body', '--quiet'];
    expect((await sheaf(['count-terms', 'all.csv', ...t, '--out', 'all.json'], { cwd: dir })).code).toBe(0);
    for (let s = 0; s < 3; s++) expect((await sheaf(['count-terms', `s${s}.csv`, ...t, '--out', `c${s}.json`], { cwd: dir })).code).toBe(0);
    expect((await sheaf(['merge-counts', 'c2.json', 'c0.json', '--out', 'c20.json', '--quiet'], { cwd: dir })).code).toBe(0);
    const m = await sheaf(['merge-counts', 'c1.json', 'c20.json', '--out', 'merged.json'], { cwd: dir });
    expect(m.stderr).toMatch(/^sheaf: 2 count file\(s\) merged: 457 documents, \d+ terms → merged\.json\n$/);
    expect(readFileSync(path.join(dir, 'merged.json'), 'utf8')).toBe(readFileSync(path.join(dir, 'all.json'), 'utf8'));

    // A model fitted on the first shard with the merged counts: df and documents of the whole export.
    const g = await sheaf(['group', 's0.csv', '--text', 'subject,body', '--id', 'ticket_id', '--groups', '4', '--clean', 'tickets', '--term-counts', 'merged.json', '--out', 'fit', '--quiet'], { cwd: dir });
    expect(g.stderr).toBe('');
    expect(g.code).toBe(0);
    const model = modelFromJson(readFileSync(path.join(dir, 'fit', 'model.json'), 'utf8'));
    const counts = termCountsFromJson(readFileSync(path.join(dir, 'merged.json'), 'utf8'));
    expect(model.vocabulary.docCount).toBe(457);
    const at = new Map(counts.terms.map((term, i) => [term, counts.df[i]]));
    let same = 0;
    for (const [j, term] of model.vocabulary.terms.entries()) if (model.vocabulary.df[j] === at.get(term)) same++;
    // Boilerplate lines are dropped when grouping (judged over the shard) but not when counting, so a few terms may count more here.
    expect(same).toBeGreaterThan(0.95 * model.vocabulary.terms.length);
    const run = JSON.parse(readFileSync(path.join(dir, 'fit', 'run.json'), 'utf8'));
    expect(run.settings.vectorize.idfCounts).toEqual({ documents: 457, terms: counts.terms.length, cleaning: 'tickets' });

    const bad = await sheaf(['group', 's0.csv', '--text', 'subject,body', '--no-stem', '--term-counts', 'merged.json', '--out', 'fit2'], { cwd: dir });
    expect(bad.stderr).toBe("sheaf: --term-counts were counted with other analyzer settings than this run's (stem true vs false); count again with the same settings\n");
    expect(bad.code).toBe(2);
  });
});
