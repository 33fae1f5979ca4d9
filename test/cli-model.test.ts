/**
 * The saved model (`model.json`, `sheaf assign`), refused tampering, and
 * `sheaf organize` (safe folder names, never overwriting).
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { existsSync, lstatSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { sheaf, tempDir } from './helpers/cli.js';
import { modelFromJson } from '../src/model/index.js';
import { groupFolderName, organizePlan, safeSegment } from '../src/cli/organize.js';

const root = path.resolve(__dirname, '..');
const demoCsv = path.join(root, 'corpus-demo', 'tickets.csv');
const demoNotes = path.join(root, 'corpus-demo', 'notes');
const csv = (file: string) => parse(readFileSync(file), { columns: true, bom: true }) as Record<string, string>[];

describe('model.json and sheaf assign', () => {
  let out: string;
  beforeAll(async () => {
    out = path.join(tempDir(), 'triage');
    const run = await sheaf(['group', demoCsv, '--text', 'subject,body', '--id', 'ticket_id', '--groups', '8', '--out', out, '--quiet']);
    expect(run.code).toBe(0);
  });

  it('reproduces the groups of its own training documents', async () => {
    const run = JSON.parse(readFileSync(path.join(out, 'run.json'), 'utf8'));
    expect(run.kmeans.converged).toBe(true);
    const dir = tempDir();
    const a = await sheaf(['assign', demoCsv, '--model', path.join(out, 'model.json'), '--text', 'subject,body', '--id', 'ticket_id', '--out', path.join(dir, 'a'), '--quiet']);
    expect(a.stderr).toBe('');
    expect(a.code).toBe(0);
    const trained = new Map(csv(path.join(out, 'documents.csv')).map((d) => [d.id, d]));
    const assigned = csv(path.join(dir, 'a', 'assigned.csv'));
    expect(assigned).toHaveLength(457);
    for (const d of assigned) {
      expect(d.group).toBe(trained.get(d.id)?.group);
      expect(Math.abs(Number(d.fit) - Number(trained.get(d.id)?.fit))).toBeLessThanOrEqual(1e-4);
      expect(d.label).toBe(trained.get(d.id)?.label);
    }
    // With the default thresholds (each group's 1% quantile of training fits minus 0.01) at most 1% of the
    // training documents look new (5% did with the 5% quantile of model version 2).
    const fresh = assigned.filter((d) => d.status === 'new').length;
    expect(fresh).toBeLessThanOrEqual(0.01 * 457);
    // Each row names its second group, another one, fitting no better.
    for (const d of assigned) {
      expect(d.second_group).not.toBe(d.group);
      expect(Number(d.second_fit)).toBeLessThanOrEqual(Number(d.fit));
    }
  });

  it('files a new ticket into the right group and flags one about something else as new', async () => {
    const dir = tempDir();
    writeFileSync(
      path.join(dir, 'week2.csv'),
      'ticket_id,body\nN1,"The water pump is broken, no water from the taps and the tank smells"\nN2,Quarterly telescope calibration schedule for the observatory dome\n',
    );
    const a = await sheaf(['assign', 'week2.csv', '--model', path.join(out, 'model.json'), '--text', 'body', '--id', 'ticket_id', '--out', 'a', '--json', '--quiet'], { cwd: dir });
    expect(a.code).toBe(0);
    const counts = JSON.parse(a.stdout);
    expect(counts).toMatchObject({ documents: 2, matched: 1, new: 1 });
    const rows = csv(path.join(dir, 'a', 'assigned.csv'));
    expect(rows[0].label).toMatch(/water|pump|tank/);
    expect(rows[0].status).toBe('matched');
    expect(rows[1].status).toBe('new');
    // --min-fit 0 accepts anything that shares a term.
    const loose = await sheaf(['assign', 'week2.csv', '--model', path.join(out, 'model.json'), '--text', 'body', '--out', 'b', '--min-fit', '0', '--json', '--quiet'], { cwd: dir });
    // … except a text with no term the model knows, which stays new whatever the threshold.
    expect(JSON.parse(loose.stdout).new).toBe(counts.noKnownTerms);
  });

  it('refuses a damaged, foreign or tampered model with one clear line', () => {
    const good = JSON.parse(readFileSync(path.join(out, 'model.json'), 'utf8'));
    const refuse = (doc: unknown): string => {
      try {
        modelFromJson(typeof doc === 'string' ? doc : JSON.stringify(doc), 'm.json');
      } catch (err) {
        return (err as Error).message;
      }
      return 'accepted';
    };
    expect(refuse(good)).toBe('accepted');
    expect(refuse('{"format": "sheaf-model",')).toMatch(/^m\.json is not valid JSON \(/);
    expect(refuse({ hello: 1 })).toBe('m.json is not a sheaf model (no "format": "sheaf-model")');
    expect(refuse({ ...good, version: 4 })).toBe('m.json has model version 4; this sheaf reads versions 1, 2 and 3');
    expect(refuse({ ...good, version: 1, cleaning: undefined, reduce: { dims: 1, oversampling: 0, powerIterations: 0, components: '', singularValues: '', centroids: '' } })).toBe('m.json is damaged: reduce is a version 2 field (this file says version 1)');
    expect(refuse({ ...good, groups: 7 })).toBe(`m.json is damaged: centroids hold ${good.vocabulary.terms.length * 8} values; ${good.vocabulary.terms.length} terms × 7 groups need ${good.vocabulary.terms.length * 7}`);
    expect(refuse({ ...good, vocabulary: { ...good.vocabulary, df: good.vocabulary.df.slice(1) } })).toBe(
      `m.json is damaged: vocabulary.df has ${good.vocabulary.terms.length - 1} entries for ${good.vocabulary.terms.length} terms`,
    );
    expect(refuse({ ...good, minFit: good.minFit.map(() => 3) })).toMatch(/^m\.json is damaged: minFit\.0: /);
    expect(refuse({ ...good, centroids: 'not*base64' })).toBe('m.json is damaged: centroids: not base64');
    // A __proto__ key is an unexpected field, not a prototype write.
    const proto = JSON.stringify(good).replace('{"format"', '{"__proto__":{"polluted":true},"format"');
    expect(refuse(proto)).toBe('m.json is damaged: (top level): unexpected field(s) "__proto__"');
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    const protoInAnalyzer = JSON.stringify(good).replace('"analyzer":{', '"analyzer":{"__proto__":{"stem":false},');
    expect(refuse(protoInAnalyzer)).toBe('m.json is damaged: analyzer: unexpected field(s) "__proto__"');
  });

  it('refuses a centroid that is not a unit vector (a value of 1e30 planted in group 3), naming the group', async () => {
    const good = JSON.parse(readFileSync(path.join(out, 'model.json'), 'utf8'));
    const bytes = Buffer.from(good.centroids, 'base64');
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    // Term-major layout: value [term * groups + g]; term 5 of group 3.
    view.setFloat32((5 * good.groups + 3) * 4, 1e30, true);
    const dir = tempDir();
    writeFileSync(path.join(dir, 'tampered.json'), JSON.stringify({ ...good, centroids: bytes.toString('base64') }));
    const run = await sheaf(['assign', demoCsv, '--text', 'subject,body', '--model', 'tampered.json', '--out', 'a'], { cwd: dir });
    expect(run.stderr).toBe(`sheaf: tampered.json is damaged: the centroid of group 3 (${JSON.stringify(good.labels[3].label)}) has length 1.000e+30; every centroid has length 1\n`);
    expect(run.code).toBe(2);
    expect(existsSync(path.join(dir, 'a'))).toBe(false);
    // A centroid scaled by 1.01 (length 1.01) is refused as well; the saved ones are within 1e-3 of 1.
    const scaled = Buffer.from(good.centroids, 'base64');
    const sv = new DataView(scaled.buffer, scaled.byteOffset, scaled.byteLength);
    for (let t = 0; t < good.vocabulary.terms.length; t++) {
      const at = (t * good.groups + 0) * 4;
      sv.setFloat32(at, sv.getFloat32(at, true) * 1.01, true);
    }
    expect(() => modelFromJson(JSON.stringify({ ...good, centroids: scaled.toString('base64') }), 'm.json')).toThrow(
      `m.json is damaged: the centroid of group 0 (${JSON.stringify(good.labels[0].label)}) has length 1.010; every centroid has length 1`,
    );
  });

  it('sheaf assign says when the model file is missing or damaged (exit 2)', async () => {
    const dir = tempDir();
    writeFileSync(path.join(dir, 'bad.json'), '{"format":"sheaf-model","version":1}');
    const missing = await sheaf(['assign', demoCsv, '--text', 'body', '--model', 'nope.json'], { cwd: dir });
    expect(missing.stderr).toBe('sheaf: no such model file: nope.json\n');
    expect(missing.code).toBe(2);
    const bad = await sheaf(['assign', demoCsv, '--text', 'body', '--model', 'bad.json'], { cwd: dir });
    expect(bad.stderr).toBe('sheaf: bad.json is damaged: createdBy: Invalid input: expected string, received undefined\n');
    expect(bad.code).toBe(2);
    expect(existsSync(path.join(dir, 'sheaf-assigned'))).toBe(false);
  });
});

describe('sheaf organize', () => {
  it('copies each file into a folder per group, never overwriting', async () => {
    const dir = tempDir();
    expect((await sheaf(['group', demoNotes, '--groups', '4', '--out', 'run', '--quiet'], { cwd: dir })).code).toBe(0);
    const plan = await sheaf(['organize', 'run', '--into', 'sorted', '--dry-run'], { cwd: dir });
    expect(plan.code).toBe(0);
    expect(plan.stdout.trimEnd().split('\n').at(-1)).toBe('40 file(s) would be copied into sorted (dry run: nothing written).');
    expect(existsSync(path.join(dir, 'sorted'))).toBe(false);

    const first = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(first.stdout).toBe('40 file(s) copied into sorted.\n');
    const groups = JSON.parse(readFileSync(path.join(dir, 'run', 'groups.json'), 'utf8')).groups;
    const folders = readdirSync(path.join(dir, 'sorted')).sort();
    expect(folders).toEqual(groups.map((g: { id: number; label: string }) => groupFolderName(g.id, g.label, 4)).sort());
    const docs = csv(path.join(dir, 'run', 'documents.csv'));
    for (const d of docs) {
      const g = groups[Number(d.group)];
      const copy = path.join(dir, 'sorted', groupFolderName(g.id, g.label, 4), ...d.id.split('/'));
      expect(readFileSync(copy, 'utf8')).toBe(readFileSync(path.join(demoNotes, ...d.id.split('/')), 'utf8'));
    }
    const again = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(again.stdout).toBe('0 file(s) copied into sorted; 40 skipped.\n');
    expect(again.stderr.split('\n')[0]).toMatch(/^sheaf: skipped sorted\/.+: already exists \(never overwritten\)$/);
  });

  it('links instead of copying with --link', async () => {
    const dir = tempDir();
    await sheaf(['group', demoNotes, '--groups', '3', '--out', 'run', '--quiet'], { cwd: dir });
    const r = await sheaf(['organize', 'run', '--into', 'linked', '--link'], { cwd: dir });
    expect(r.stdout).toBe('40 file(s) linked into linked.\n');
    const any = readdirSync(path.join(dir, 'linked'))[0];
    const file = readdirSync(path.join(dir, 'linked', any), { recursive: true, withFileTypes: true }).find((e) => e.isSymbolicLink());
    expect(file).toBeDefined();
    expect(lstatSync(path.join(file!.parentPath, file!.name)).isSymbolicLink()).toBe(true);
  });

  it('refuses a run made from export rows', async () => {
    const dir = tempDir();
    await sheaf(['group', demoCsv, '--text', 'body', '--groups', '3', '--out', 'run', '--quiet'], { cwd: dir });
    const r = await sheaf(['organize', 'run', '--into', 'sorted'], { cwd: dir });
    expect(r.stderr).toBe('sheaf: run came from rows of an export, not files; there is nothing to copy\n');
    expect(r.code).toBe(2);
  });

  it('makes safe, unique folder and file names', () => {
    expect(safeSegment('../../etc')).toBe('..-..-etc'); // one harmless name: no separator left
    expect(safeSegment('..')).toBe('unnamed');
    expect(safeSegment('CON')).toBe('_CON');
    expect(safeSegment('nul.txt')).toBe('_nul.txt');
    expect(safeSegment('a/b\\c:d*e?f"g<h>i|j')).toBe('a-b-c-d-e-f-g-h-i-j');
    expect(safeSegment('tab\there\u0000')).toBe('tab here');
    expect(safeSegment('trailing dots...')).toBe('trailing dots');
    expect(safeSegment('x'.repeat(200))).toHaveLength(80);
    expect(groupFolderName(3, 'pump · tank · water', 12)).toBe('03 pump - tank - water');
    const plan = organizePlan('/into', [
      { id: 'a/B.md', group: '0', label: 'x', path: '/in/a/B.md' },
      { id: 'a/B?.md', group: '0', label: 'x', path: '/in/a/B?.md' },
      { id: 'a/B-.md', group: '0', label: 'x', path: '/in/a/B-.md' },
    ], 1);
    expect(plan.map((s) => s.to)).toEqual(['/into/0 x/a/B.md', '/into/0 x/a/B-.md', '/into/0 x/a/B- (2).md']);
  });
});
