/**
 * The steering files of `sheaf group` (`--guide`, `--previous`, `--edits`) are
 * read and checked before any document is read or analysed: a bad one gives
 * its one line (exit 2) while the clock hook shows that no stage was timed, and
 * the library refuses a guide the run cannot take before the analysis step.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import { runCli } from '../src/cli/program.js';
import { groupDocumentsAsync } from '../src/pipeline.js';
import { fitHere } from '../src/runners.js';
import { sheaf, tempDir } from './helpers/cli.js';
import { weeklyPile } from './helpers/weekly.js';
import type { Doc } from '../src/types.js';

/** Runs the CLI in-process and counts the calls of the clock hook (every stage, reading included, is timed with it). */
async function timedSheaf(argv: string[], cwd: string): Promise<{ code: number; stderr: string; clockCalls: number }> {
  let stderr = '';
  let clockCalls = 0;
  const code = await runCli(argv, {
    stdout: { write: () => true, isTTY: false },
    stderr: { write: (s: string) => (stderr += s), isTTY: false },
    cwd,
    env: {},
    now: () => ++clockCalls,
  });
  return { code, stderr, clockCalls };
}

describe('sheaf group: --guide, --previous and --edits checked before the documents are read', () => {
  let dir: string;
  const pile = weeklyPile(2, { heating: 20, billing: 20, parcels: 20 });
  const common = ['group', 'pile.csv', '--text', 'body', '--id', 'ticket_id', '--clean', 'none', '--no-duplicates', '--quiet', '--out', 'x'];
  const put = (name: string, doc: unknown) => writeFileSync(path.join(dir, name), typeof doc === 'string' ? doc : JSON.stringify(doc));

  beforeAll(async () => {
    dir = tempDir();
    writeFileSync(path.join(dir, 'pile.csv'), pile.csv);
    put('guide.json', { format: 'sheaf-guide', groups: [{ name: 'Boilers', terms: ['boiler'] }] });
    put('three.json', { format: 'sheaf-guide', groups: [{ name: 'A', terms: ['boiler'] }, { name: 'B', terms: ['invoice'] }, { name: 'C', terms: ['parcel'] }] });
    put('bad-edits.json', []);
    put('foreign.json', { format: 'other' });
    const first = await sheaf(['group', 'pile.csv', '--text', 'body', '--id', 'ticket_id', '--clean', 'none', '--no-duplicates', '--quiet', '--groups', '3', '--out', 'w1'], { cwd: dir });
    expect(first.code).toBe(0);
  });

  it.each([
    ['a guide with groups auto', ['--groups', 'auto', '--guide', 'guide.json'], 'sheaf: a guide needs method kmeans and a number of groups; got method kmeans and groups auto\n'],
    ['a guide with method agglomerative', ['--groups', '3', '--method', 'agglomerative', '--guide', 'guide.json'], 'sheaf: a guide needs method kmeans and a number of groups; got method agglomerative and groups 3\n'],
    ['a guide and a previous run', ['--groups', '3', '--guide', 'guide.json', '--previous', 'w1'], 'sheaf: give a guide or a previous run, not both (a guide starts the groups afresh; a previous run carries its own names)\n'],
    ['a guide naming more groups than asked', ['--groups', '2', '--guide', 'three.json'], 'sheaf: three.json names 3 groups; groups is 2: ask for at least as many groups as the guide names\n'],
    ['a missing guide file', ['--groups', '3', '--guide', 'nope.json'], 'sheaf: no such guide file: nope.json\n'],
    ['a missing previous model', ['--groups', '3', '--previous', 'nowhere'], 'sheaf: no such model file: nowhere\n'],
    ['a foreign previous model', ['--groups', '3', '--previous', 'foreign.json'], 'sheaf: foreign.json is not a sheaf model (no "format": "sheaf-model")\n'],
    ['a missing edits file', ['--groups', '3', '--edits', 'none.json'], 'sheaf: no such edits file: none.json\n'],
    ['an edits file that is not one', ['--groups', '3', '--edits', 'bad-edits.json'], 'sheaf: bad-edits.json is not a sheaf edits file: it is an object { "format": "sheaf-edits", "edits": [ … ] }\n'],
  ])('%s: one line, exit 2, nothing read or timed', async (_name, flags, message) => {
    const run = await timedSheaf([...common, ...(flags as string[])], dir);
    expect(run.stderr).toBe(message);
    expect(run.code).toBe(2);
    expect(run.clockCalls).toBe(0);
  });
});

describe('groupDocumentsAsync: a guide the run cannot take is refused before the analysis step', () => {
  const docs: Doc[] = ['boiler cold radiator', 'invoice refund charge', 'parcel courier van', 'boiler pilot flame'].map((text, i) => ({
    id: String(i + 1),
    source: 't',
    title: '',
    text,
    fields: new Map(),
  }));
  const guide = { source: 'g.json', groups: [{ name: 'Boilers', terms: ['boiler'], examples: [] }] };

  it.each([
    ['groups auto', { groups: 'auto' as const }, {}, 'a guide needs method kmeans and a number of groups; got method kmeans and groups auto'],
    ['a previous run', { groups: 2 }, { previous: { groups: { source: 'p', groups: 2, terms: [], centroids: new Float32Array(0), labels: [] }, options: { minSimilarity: 0.5, sizeChange: 0.25 } } }, 'give a guide or a previous run, not both (a guide starts the groups afresh; a previous run carries its own names)'],
    ['an unknown example id', { groups: 2 }, { guideExamples: ['9'] }, 'g.json: group 1 (Boilers): no document has the id "9"'],
  ])('%s', async (_name, options, extra, message) => {
    let analysed = 0;
    const stages: string[] = [];
    const g = 'guideExamples' in extra ? { ...guide, groups: [{ ...guide.groups[0]!, examples: extra.guideExamples as string[] }] } : guide;
    const hooks = { guide: g, progress: (s: string) => stages.push(s), ...('previous' in extra ? { previous: extra.previous } : {}) };
    const run = groupDocumentsAsync(docs, { ...options, clean: { mode: 'none' } }, { vectorize: async (req) => (analysed++, fitHere(req)) }, hooks as never);
    await expect(run).rejects.toThrow(message);
    expect(analysed).toBe(0);
    expect(stages).toEqual([]);
  });
});
