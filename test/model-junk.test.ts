/**
 * The analyzer's `junk` setting in a saved model: written by new models, and
 * read as false from models written before the setting existed (they were
 * fitted with junk tokens kept, so `assign` must analyse new text the same way).
 */
import { describe, expect, it } from 'vitest';
import { createAnalyzer } from '../src/analyze/index.js';
import { fitTfidf } from '../src/vectorize/index.js';
import { modelFromJson, modelToJson } from '../src/model/index.js';
import { DEFAULT_CLEAN_STAGE } from '../src/clean/stage.js';

function model(junk: boolean): string {
  const analyzer = createAnalyzer({ stem: false, junk });
  const texts = ['lamp keeper lens', 'lamp lens tower', 'harbour boat rope', 'boat rope quay'];
  const { vocabulary } = fitTfidf(texts.map((t) => analyzer.analyze(t)));
  const k = 2;
  const centroids = new Float32Array(k * vocabulary.terms.length).fill(1 / Math.sqrt(vocabulary.terms.length)); // unit centres (the model check refuses others)
  return modelToJson({
    createdBy: 'test',
    cleaning: DEFAULT_CLEAN_STAGE,
    analyzer: analyzer.settings,
    vocabulary,
    groups: k,
    centroids,
    assignments: Int32Array.from([0, 0, 1, 1]),
    fit: Float32Array.from([0.9, 0.8, 0.9, 0.8]),
    labels: [
      { id: 0, label: 'lamp', terms: [{ term: 'lamp', weight: 1 }], size: 2 },
      { id: 1, label: 'boat', terms: [{ term: 'boat', weight: 1 }], size: 2 },
    ],
  });
}

describe('model analyzer settings: junk', () => {
  it('round-trips junk: true and junk: false', () => {
    expect(modelFromJson(model(true)).analyzer.junk).toBe(true);
    expect(modelFromJson(model(false)).analyzer.junk).toBe(false);
  });

  it('reads a model without the junk field (written before it existed) as junk: false', () => {
    const doc = JSON.parse(model(true)) as { analyzer: Record<string, unknown> };
    delete doc.analyzer['junk'];
    const m = modelFromJson(JSON.stringify(doc));
    expect(m.analyzer.junk).toBe(false);
    expect(createAnalyzer(m.analyzer).analyze('build 6b2fefb9 nbsp')).toEqual(['build', '6b2fefb9', 'nbsp']);
  });
});
