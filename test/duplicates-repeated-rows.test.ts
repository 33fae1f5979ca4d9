/**
 * The exact-copy keys of a near-copy search are computed only for rows
 * another row may equal (src/duplicates/repeated-rows.ts): on random texts
 * that differ in case, white space and compatibility forms, the copy groups
 * are those of keying every text (the naive reference), with TF-IDF rows
 * (several analyzer settings) and with shingle rows (fast-check).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Csr, Doc } from '../src/types.js';
import { copyKey, findDuplicates, type FindDuplicatesOptions } from '../src/near-copies.js';
import { exactCopies } from '../src/duplicates/index.js';
import { rowsThatMayRepeat } from '../src/duplicates/repeated-rows.js';

const WORDS = ['printer', 'Printer', 'PRINTER', 'jams', 'paper', 'tray', 'ﬁle', 'file', 'the', 'a', 'refund', 'Straße', 'strasse', "don't", 'x2', '42', '日本語', 'über'];
const SPACES = [' ', '  ', '\t', '\n', '\r\n', '\u00a0', ' \n ', ', ', '. '];
const text = fc
  .tuple(fc.constantFrom('', ' ', '\n'), fc.array(fc.tuple(fc.constantFrom(...WORDS), fc.constantFrom(...SPACES)), { maxLength: 6 }))
  .map(([lead, parts]) => lead + parts.map(([w, s]) => w + s).join(''));
/** Piles where texts repeat, with their white space or case changed. */
const pile = fc.array(text, { minLength: 1, maxLength: 12 }).chain((base) =>
  fc.array(fc.tuple(fc.nat(base.length - 1), fc.constantFrom('same', 'upper', 'spaces', 'trail')), { maxLength: 12 }).map((copies) => [
    ...base,
    ...copies.map(([i, how]) => {
      const t = base[i]!;
      return how === 'upper' ? t.toUpperCase() : how === 'spaces' ? t.replace(/ /g, ' \t ') : how === 'trail' ? `  ${t}\n` : t;
    }),
  ]),
);
const asDocs = (texts: string[]): Doc[] => texts.map((t, i) => ({ id: `d${String(i).padStart(3, '0')}`, source: 's', title: '', text: t, fields: new Map<string, string>() }));

const SETTINGS: FindDuplicatesOptions[] = [
  { threshold: 0.9 },
  { threshold: 0.9, analyzer: { stem: false, phrases: true, numbers: true } },
  { by: 'shingles', shingle: 2 },
];

describe('copy keys only where rows may repeat', () => {
  for (const options of SETTINGS) {
    it(`the copy groups are those of keying every text (${JSON.stringify(options)})`, () => {
      fc.assert(
        fc.property(pile, (texts) => {
          let run;
          try {
            run = findDuplicates(asDocs(texts), options);
          } catch {
            return; // no terms at all in the pile: nothing to compare
          }
          const keys = run.docs.map((d) => copyKey(d.text));
          const may = rowsThatMayRepeat(run.matrix);
          // Equal keys mean equal rows, so both are marked.
          const first = new Map<string, number>();
          keys.forEach((k, r) => {
            if (k === '') return;
            const f = first.get(k);
            if (f === undefined) first.set(k, r);
            else {
              expect(may[f]).toBe(1);
              expect(may[r]).toBe(1);
            }
          });
          const naive = exactCopies(keys);
          expect(Array.from(exactCopies(keys.map((k, r) => (may[r] ? k : ''))))).toEqual(Array.from(naive));
          expect(run.exactCopies).toBe(Array.from(naive).filter((g, r) => g >= 0 && naive.indexOf(g) !== r).length);
        }),
        { numRuns: 150 },
      );
    });
  }

  it('marks the rows with an equal twin and leaves the others (worked case)', () => {
    const m: Csr = {
      rows: 4,
      cols: 3,
      indptr: Int32Array.of(0, 2, 4, 6, 6),
      indices: Int32Array.of(0, 2, 0, 2, 0, 1),
      values: Float32Array.of(0.6, 0.8, 0.6, 0.8, 0.6, 0.8),
    };
    expect(Array.from(rowsThatMayRepeat(m))).toEqual([1, 1, 0, 0]);
  });
});
