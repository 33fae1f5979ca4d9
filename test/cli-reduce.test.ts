/**
 * Grouping on reduced vectors (`--reduce D`): the saved projection, `sheaf
 * assign` reproducing the training groups through it, flag errors, and the
 * pipeline's term-space naming.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { modelFromJson } from '../src/model/index.js';
import { groupDocuments } from '../src/pipeline.js';
import { partitionFromAssignments } from '../src/cluster/partition.js';
import type { Doc } from '../src/types.js';

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');
const csv = (file: string) => parse(readFileSync(file), { columns: true, bom: true }) as Record<string, string>[];
const demoFlags = ['--text', 'subject,body', '--id', 'ticket_id'];

describe('sheaf group --reduce and sheaf assign', () => {
  let out: string;
  beforeAll(async () => {
    out = path.join(tempDir(), 'reduced');
    const run = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--reduce', '20', '--truth', 'category', '--out', out, '--quiet', '--no-report']);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
  });

  it('records the reduction in run.json (settings, a timed stage) and the projection in model.json (version 3)', () => {
    const run = JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8'));
    expect(run.settings.grouping.reduce).toEqual({ dims: 20, oversampling: 10, powerIterations: 5, auto: false });
    expect(run.reduced).toEqual({ dims: 20 });
    expect(run.timings.map((t: { stage: string }) => t.stage)).toEqual(
      expect.arrayContaining(['analyze+vectorize', 'reduce', 'k-means', 'label']),
    );
    const text = readFileSync(path.join(out, 'model.json'), 'utf8');
    expect(JSON.parse(text).version).toBe(3);
    const model = modelFromJson(text, 'model.json');
    const terms = model.vocabulary.terms.length;
    expect(model.reduce?.dims).toBe(20);
    expect(model.reduce?.components.length).toBe(20 * terms);
    expect(model.reduce?.centroids.length).toBe(20 * 8);
    expect(model.centroids.length).toBe(terms * 8); // term-space centroids are kept too
    const sv = Array.from(model.reduce?.singularValues ?? []);
    expect(sv.every((s, i) => i === 0 || s <= sv[i - 1]!)).toBe(true);
  });

  it('assign on the training documents reproduces their groups and fits', async () => {
    const run = JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8'));
    expect(run.kmeans.converged).toBe(true);
    const dir = tempDir();
    const a = await sheaf(['assign', demoCsv, '--model', path.join(out, 'model.json'), ...demoFlags, '--out', path.join(dir, 'a'), '--quiet']);
    expect(a.stderr).toBe('');
    expect(a.code).toBe(0);
    const trained = new Map(csv(path.join(out, 'documents.csv')).map((d) => [d.id, d]));
    const assigned = csv(path.join(dir, 'a', 'assigned.csv'));
    expect(assigned).toHaveLength(457);
    for (const d of assigned) {
      expect(d.group).toBe(trained.get(d.id)?.group);
      expect(Math.abs(Number(d.fit) - Number(trained.get(d.id)?.fit))).toBeLessThanOrEqual(1e-4);
    }
    const fresh = assigned.filter((d) => d.status === 'new').length;
    expect(fresh).toBeLessThan(0.1 * 457);
  });

  it('files a new ticket about water into the water group through the projection', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'week2.csv'), 'ticket_id,body\nN1,"The water pump is broken, no water from the taps and the tank smells"\n');
    const a = await sheaf(['assign', 'week2.csv', '--model', path.join(out, 'model.json'), '--text', 'body', '--id', 'ticket_id', '--out', 'a', '--quiet'], { cwd: dir });
    expect(a.code).toBe(0);
    const rows = csv(path.join(dir, 'a', 'assigned.csv'));
    expect(rows[0]!.label).toMatch(/water|pump|tank/);
    expect(rows[0]!.status).toBe('matched');
  });

  it('refuses a tampered projection with one clear line', () => {
    const good = JSON.parse(readFileSync(path.join(out, 'model.json'), 'utf8'));
    const refuse = (doc: unknown): string => {
      try {
        modelFromJson(JSON.stringify(doc), 'm.json');
      } catch (err) {
        return (err as Error).message;
      }
      return 'accepted';
    };
    const terms = good.vocabulary.terms.length;
    expect(refuse(good)).toBe('accepted');
    expect(refuse({ ...good, reduce: { ...good.reduce, dims: 19 } })).toBe(
      `m.json is damaged: reduce.components hold ${20 * terms} values; 19 dims × ${terms} terms need ${19 * terms}`,
    );
    expect(refuse({ ...good, reduce: { ...good.reduce, centroids: good.centroids } })).toBe(
      `m.json is damaged: reduce.centroids hold ${terms * 8} values; 20 dims × 8 groups need 160`,
    );
    expect(refuse({ ...good, version: 1, cleaning: undefined })).toBe('m.json is damaged: reduce is a version 2 field (this file says version 1)');
    expect(refuse({ ...good, reduce: { ...good.reduce, extra: 1 } })).toBe('m.json is damaged: reduce: unexpected field(s) "extra"');
  });

  it('--reduce auto is the default (50 dims on the demo: same documents.csv as --reduce 50); --no-reduce keeps the TF-IDF rows', async () => {
    const dir = tempDir();
    const plain = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--out', 'p', '--quiet', '--no-report', '--no-duplicates'], { cwd: dir });
    const fifty = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--reduce', '50', '--out', 'f', '--quiet', '--no-report', '--no-duplicates'], { cwd: dir });
    const off = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--no-reduce', '--out', 'q', '--quiet', '--no-report', '--no-duplicates'], { cwd: dir });
    expect([plain.code, fifty.code, off.code]).toEqual([0, 0, 0]);
    expect(readFileSync(path.join(dir, 'f', 'documents.csv'), 'utf8')).toBe(readFileSync(path.join(dir, 'p', 'documents.csv'), 'utf8'));
    expect(JSON.parse(readFileSync(path.join(dir, 'p', 'run.json'), 'utf8')).reduced).toEqual({ dims: 50 });
    expect(JSON.parse(readFileSync(path.join(dir, 'q', 'run.json'), 'utf8')).reduced).toBeNull();
    const model = JSON.parse(readFileSync(path.join(dir, 'q', 'model.json'), 'utf8'));
    expect(model.version).toBe(3);
    expect(model.reduce).toBeUndefined();
    expect(JSON.parse(readFileSync(path.join(dir, 'p', 'model.json'), 'utf8')).reduce.dims).toBe(50);
  });

  it('bad --reduce values: one line, exit 2', async () => {
    const dir = tempDir();
    const zero = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--reduce', '0', '--out', 'x'], { cwd: dir });
    expect(zero.stderr).toBe('sheaf: --reduce must be a whole number >= 1; got 0\n');
    expect(zero.code).toBe(2);
    const word = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--reduce', 'many', '--out', 'x'], { cwd: dir });
    expect(word.stderr).toBe('sheaf: --reduce must be a whole number; got "many"\n');
    expect(word.code).toBe(2);
    const big = await sheaf(['group', demoCsv, ...demoFlags, '--groups', '8', '--reduce', '5000', '--out', 'x', '--quiet'], { cwd: dir });
    expect(big.stderr).toBe('sheaf: --reduce must be a whole number from 1 to 457 (the smaller of the non-empty documents and the terms); got 5000\n');
    expect(big.code).toBe(2);
  });
});

describe('groupDocuments with reduce', () => {
  const docs: Doc[] = csv(demoCsv).map((r) => ({
    id: r.ticket_id!,
    source: 'tickets.csv',
    title: r.subject!,
    text: `${r.subject}\n${r.body}`,
    fields: new Map([['category', r.category!]]),
  }));

  it('forms groups on the reduced rows and names them from TF-IDF centroids of their members', () => {
    const res = groupDocuments(docs, { groups: 8, reduce: { dims: 30 }, seed: 2 });
    expect(res.options.reduce).toEqual({ dims: 30, oversampling: 10, powerIterations: 5, auto: false });
    expect(res.reduced).not.toBeNull();
    const reduced = res.reduced!;
    expect(reduced.matrix.cols).toBe(30);
    expect(reduced.centroids.length).toBe(30 * 8);
    // The term-space centroids are the normalised sums of the members' TF-IDF rows.
    const terms = partitionFromAssignments(res.matrix, res.partition.assignments, 8);
    expect(res.partition.centroids).toEqual(terms.centroids);
    // Fits are the reduced space's: cosine of the reduced row to its reduced centre.
    for (const r of [0, 100, 300]) {
      const g = res.partition.assignments[r]!;
      let s = 0;
      for (let j = 0; j < 30; j++) s += reduced.svd.rows[r * 30 + j]! * reduced.centroids[j * 8 + g]!;
      expect(Math.abs(res.partition.fit[r]! - s)).toBeLessThan(1e-5);
    }
    expect(res.timings.map((t) => t.stage)).toContain('reduce');
  });

  it('no reduce setting is auto (50 dims here, as reduce: true); the same seed the same groups', () => {
    const a = groupDocuments(docs, { groups: 5 });
    const b = groupDocuments(docs, { groups: 5, reduce: true });
    expect(b.partition.assignments).toEqual(a.partition.assignments);
    expect(a.reduced!.svd.dims).toBe(50);
    expect(groupDocuments(docs, { groups: 5, reduce: false }).reduced).toBeNull();
    const c = groupDocuments(docs, { groups: 5, reduce: true });
    const d = groupDocuments(docs, { groups: 5, reduce: true });
    expect(d.partition.assignments).toEqual(c.partition.assignments);
    expect(d.reduced!.svd.components).toEqual(c.reduced!.svd.components);
  });

  it('works with groups auto and with the document-level tree', () => {
    const auto = groupDocuments(docs, { groups: 'auto', choose: { range: [4, 10] }, reduce: { dims: 20 } });
    expect(auto.choice?.chosen).toBeGreaterThanOrEqual(4);
    expect(auto.partition.centroids.length).toBe(auto.matrix.cols * auto.partition.groups);
    const tree = groupDocuments(docs, { groups: 6, method: 'agglomerative', reduce: { dims: 20 } });
    expect(tree.partition.groups).toBe(6);
    expect(tree.reduced!.centroids.length).toBe(20 * 6);
  });

  it('refuses a bad reduce setting before any work', () => {
    expect(() => groupDocuments(docs, { groups: 5, reduce: { dims: -3 } })).toThrow('dims must be a whole number >= 1; got -3');
    expect(() => groupDocuments(docs, { groups: 5, reduce: { powerIterations: 1.5 } })).toThrow('powerIterations must be a whole number >= 0; got 1.5');
  });
});
