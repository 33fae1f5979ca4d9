import { describe, expect, it } from 'vitest';
import { sampledSilhouette, silhouetteForCuts } from '../src/cluster/quality.js';
import { cutToGroups, documentAverageLink, groupAverageLink } from '../src/cluster/tree.js';
import { syntheticCorpus } from './fixtures/quality/synthetic.js';

describe('sampledSilhouette with sampling', () => {
  // 3000 rows, 300 terms, 8 topics, 10% of labels reassigned at random
  const { matrix, labels } = syntheticCorpus(42, 3000, 300, 8, 0.1);
  const exact = sampledSilhouette(matrix, labels, 8, { sampleSize: 3000, seed: 1 });

  it('is deterministic for a seed and differs between seeds', () => {
    const a = sampledSilhouette(matrix, labels, 8, { sampleSize: 500, seed: 11 });
    const b = sampledSilhouette(matrix, labels, 8, { sampleSize: 500, seed: 11 });
    const c = sampledSilhouette(matrix, labels, 8, { sampleSize: 500, seed: 12 });
    expect(a.sampled).toBe(500);
    expect(b.mean).toBe(a.mean);
    expect(Array.from(b.perGroup)).toEqual(Array.from(a.perGroup));
    expect(c.mean).not.toBe(a.mean);
  });

  it('stays within 0.04 of the exact value with 1000 of 3000 rows (seeds 1..10)', () => {
    // Measured: exact 0.6276; over seeds 1..10, largest |sampled - exact| 0.0231, mean 0.0094.
    // For scale: on the 4000-row version of this set, scikit-learn's silhouette_samples have standard
    // deviation 0.43 (so sd of a 1000-row mean is about 0.0135), and silhouette_score(sample_size=300)
    // over random_state 0..19 strayed up to 0.063 from the exact value, against 0.071 for ours (seeds 1..20).
    expect(exact.sampled).toBe(3000);
    expect(exact.mean).toBeGreaterThan(0.5);
    let worst = 0;
    let sum = 0;
    for (let seed = 1; seed <= 10; seed++) {
      const s = sampledSilhouette(matrix, labels, 8, { sampleSize: 1000, seed });
      expect(s.sampled).toBe(1000);
      const d = Math.abs(s.mean - exact.mean);
      worst = Math.max(worst, d);
      sum += d;
    }
    expect(worst).toBeLessThan(0.04);
    expect(sum / 10).toBeLessThan(0.02);
    expect(worst).toBeGreaterThan(0); // it really sampled
  });
});

describe('silhouetteForCuts equals sampledSilhouette on each cut', () => {
  it('tree over 20 groups, sampled, cuts 2..10', () => {
    const { matrix, labels } = syntheticCorpus(7, 1500, 200, 6, 0.05);
    // 20 leaf groups: topic label crossed with row parity -> an over-clustered partition
    const leafOf = labels.map((l, r) => (l * 4 + (r % 4)) % 20);
    const tree = groupAverageLink(matrix, leafOf, 20);
    const cuts = [2, 3, 4, 6, 8, 10, 20];
    const opts = { sampleSize: 400, seed: 3 };
    const many = silhouetteForCuts(matrix, leafOf, tree, cuts, opts);
    expect(many.sampled).toBe(400);
    many.cuts.forEach((cut, i) => {
      const k = cuts[i]!;
      expect(cut.groups).toBe(k);
      expect(Array.from(cut.leafClusters)).toEqual(Array.from(cutToGroups(tree, k)));
      const rowCluster = leafOf.map((leaf) => cut.leafClusters[leaf]!);
      const one = sampledSilhouette(matrix, rowCluster, k, opts);
      expect(Math.abs(cut.mean - one.mean)).toBeLessThan(1e-12);
      one.perGroup.forEach((v, g) => {
        if (Number.isNaN(v)) expect(Number.isNaN(cut.perGroup[g]!)).toBe(true);
        else expect(Math.abs(cut.perGroup[g]! - v)).toBeLessThan(1e-12);
      });
    });
    // the cuts really differ
    expect(new Set(many.cuts.map((c) => c.mean.toFixed(6))).size).toBe(cuts.length);
  });

  it('document-level tree (each row its own leaf), exact, and rows left out with -1', () => {
    const { matrix } = syntheticCorpus(8, 150, 80, 4, 0);
    const tree = documentAverageLink(matrix);
    const leafOf = Int32Array.from({ length: 150 }, (_, r) => (r % 10 === 0 ? -1 : r));
    const cuts = [1, 2, 4, 7];
    const many = silhouetteForCuts(matrix, leafOf, tree, cuts, { sampleSize: 1000, seed: 1 });
    expect(many.sampled).toBe(135);
    expect(Number.isNaN(many.cuts[0]!.mean)).toBe(true); // one cluster: undefined
    for (let i = 1; i < cuts.length; i++) {
      const cut = many.cuts[i]!;
      const rowCluster = leafOf.map((leaf) => (leaf === -1 ? -1 : cut.leafClusters[leaf]!));
      const one = sampledSilhouette(matrix, rowCluster, cuts[i]!, { sampleSize: 1000, seed: 1 });
      expect(Math.abs(cut.mean - one.mean)).toBeLessThan(1e-12);
    }
  });

  it('rejects a cut outside the tree', () => {
    const { matrix, labels } = syntheticCorpus(9, 50, 40, 3, 0);
    const tree = groupAverageLink(matrix, labels, 3);
    expect(() => silhouetteForCuts(matrix, labels, tree, [4])).toThrow('groups must be a whole number from 1 to 3; got 4');
  });
});
