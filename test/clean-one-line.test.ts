/**
 * The `auto` cleaning stage's shortcut for piles of one-line documents
 * (src/clean/one-line.ts) against the full detection pass it skips: on
 * random piles built from lines every rule fires on, the stage gives what
 * cleaning everything, counting the clutter and keeping the pile as written
 * gives (fast-check).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Doc } from '../src/types.js';
import { cleanDocuments } from '../src/clean/index.js';
import { AUTO_CLUTTER_SHARE, cleanStage, resolveCleanStage, type CleanSettings } from '../src/clean/stage.js';
import { atMostOneLine, noClutterPossible } from '../src/clean/one-line.js';

/** The detection as the stage did it before the shortcut: clean all, count the clutter, keep or apply. */
function naiveAuto(docs: readonly Doc[], settings: CleanSettings): ReturnType<typeof cleanStage> {
  const full = cleanDocuments(docs, settings.rules);
  const share = full.report.withClutter / full.report.documents;
  const applied = share >= AUTO_CLUTTER_SHARE;
  const detected = { share, threshold: AUTO_CLUTTER_SHARE, applied };
  if (applied) return { docs: full.docs, report: { ...full.report, detected } };
  return { docs: docs.slice(), report: { ...cleanDocuments(docs, { ...settings.rules, mode: 'none' }).report, withClutter: full.report.withClutter, detected } };
}

/** Lines each rule fires on, and plain ones. */
const LINES = [
  'Hi team,',
  'Dear Support',
  'Thanks,',
  'Kind regards',
  'Thanks, Maria',
  '> the earlier message',
  'On Mon, 3 Dec 2026, Ann wrote:',
  '-----Original Message-----',
  'From: Ann Lee',
  'Sent: Monday',
  '-- ',
  '--',
  'Sent from my phone',
  '______________________',
  'my refund never came',
  'the printer on floor 2 jams',
  'see https://example.org/a for 12345678',
  '',
  '   ',
];
const line = fc.constantFrom(...LINES);
const blank = fc.constantFrom('', ' ', '\t');
const eol = fc.constantFrom('\n', '\r\n', '\r');
/** A document with at most one non-blank line, with blank lines around it. */
const oneLineDoc = fc.tuple(fc.array(fc.tuple(blank, eol), { maxLength: 2 }), line, fc.array(fc.tuple(eol, blank), { maxLength: 2 })).map(
  ([before, l, after]) => before.map(([b, e]) => b + e).join('') + l + after.map(([e, b]) => e + b).join(''),
);
const anyDoc = fc.array(fc.tuple(line, eol), { minLength: 1, maxLength: 6 }).map((ls) => ls.map(([l, e]) => l + e).join(''));
const asDocs = (texts: string[]): Doc[] => texts.map((text, i) => ({ id: String(i), source: 'x.csv', title: `t${i}`, text, fields: new Map<string, string>() }));

describe('one-line documents in the auto cleaning stage', () => {
  const settings = resolveCleanStage({ mode: 'auto' });

  it('a pile of one-line documents: the stage gives what the full detection gives, and no clutter is counted', () => {
    fc.assert(
      fc.property(fc.array(oneLineDoc, { minLength: 1, maxLength: 30 }), (texts) => {
        const docs = asDocs(texts);
        expect(noClutterPossible(docs)).toBe(true);
        const naive = naiveAuto(docs, settings);
        expect(naive.report.withClutter).toBe(0);
        expect(cleanStage({ docs }, settings)).toEqual(naive);
      }),
      { numRuns: 300 },
    );
  });

  it('piles with several-line documents (the full pass runs) give the same as before', () => {
    fc.assert(
      fc.property(fc.array(fc.oneof(oneLineDoc, anyDoc), { minLength: 1, maxLength: 20 }), (texts) => {
        const docs = asDocs(texts);
        expect(cleanStage({ docs }, settings)).toEqual(naiveAuto(docs, settings));
      }),
      { numRuns: 200 },
    );
  });

  it('counts non-blank lines as the cleaning splits them', () => {
    expect(atMostOneLine('one line')).toBe(true);
    expect(atMostOneLine('\n  \r\nonly this\r\n\t')).toBe(true);
    expect(atMostOneLine('Hi,\rthere')).toBe(false);
    expect(atMostOneLine('Hi,\r\nthere')).toBe(false);
    expect(atMostOneLine('')).toBe(true);
    expect(noClutterPossible(asDocs(['a', 'b\nc']))).toBe(false);
  });

  it('a greeting-only pile: every document would be emptied, so each is kept whole and none counts (worked case)', () => {
    const docs = asDocs(['Hi team,', 'Thanks', '> quoted']);
    const full = cleanDocuments(docs, settings.rules);
    expect(full.report.keptWhole).toBe(3);
    expect(full.report.withClutter).toBe(0);
    const out = cleanStage({ docs }, settings);
    expect(out.report.detected).toEqual({ share: 0, threshold: AUTO_CLUTTER_SHARE, applied: false });
    expect(out.docs).toEqual(docs);
  });
});
