/**
 * The grouping-method seam: the registry, the result tagged by `method`, the
 * seed at the top level of the options.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { groupDocuments, resolveGroupOptions } from '../src/pipeline.js';
import { METHOD_NAMES, methodOf } from '../src/methods/index.js';
import type { Doc } from '../src/types.js';

const root = path.resolve(__dirname, '..');
const rows = parse(readFileSync(path.join(root, 'corpus-demo', 'tickets.csv')), { columns: true, bom: true }) as Record<string, string>[];
const docs: Doc[] = rows.slice(0, 150).map((r) => ({ id: r.ticket_id!, source: 't', title: r.subject!, text: `${r.subject}\n${r.body}`, fields: new Map() }));

describe('grouping methods', () => {
  it('the registry lists kmeans (the default) and agglomerative', () => {
    expect(METHOD_NAMES).toEqual(['kmeans', 'agglomerative']);
    expect(resolveGroupOptions({ groups: 3 }).method).toBe('kmeans');
  });

  it('a result carries its method and only that method’s fields', () => {
    const km = groupDocuments(docs, { groups: 4 });
    expect(km.method).toBe('kmeans');
    expect('documentTree' in km).toBe(false);
    if (km.method === 'kmeans') expect(km.kmeans.groups).toBe(4);
    expect(methodOf(km).outputs(km, km.docs).size).toBe(0);
    expect(Object.keys(methodOf(km).runRecord(km))).toEqual(['kmeans']);
    const ag = groupDocuments(docs, { groups: 4, method: 'agglomerative' });
    expect(ag.method).toBe('agglomerative');
    expect('kmeans' in ag).toBe(false);
    const files = methodOf(ag).outputs(ag, ag.docs);
    expect([...files.keys()]).toEqual(['documents.nwk']);
    // One leaf per document with terms, each named by its id.
    expect(files.get('documents.nwk')!.match(/[(,]([^(),:;]+):/g)).toHaveLength(150 - ag.emptyRows.length);
  });

  it('the seed is a top-level option; it seeds k-means and the silhouette sample alike', () => {
    const r = resolveGroupOptions({ groups: 3, seed: 7 });
    expect(r.seed).toBe(7);
    expect(r.kmeans.seed).toBe(7);
    const a = groupDocuments(docs, { groups: 4, seed: 7 });
    const b = groupDocuments(docs, { groups: 4, seed: 7 });
    expect(a.partition.assignments).toEqual(b.partition.assignments);
  });

  it('refuses kmeans.seed with a message naming the new place', () => {
    expect(() => resolveGroupOptions({ groups: 3, kmeans: { seed: 2 } as never })).toThrow(
      'kmeans.seed has moved: give seed at the top level of the options (it seeds sampling too)',
    );
  });
});
