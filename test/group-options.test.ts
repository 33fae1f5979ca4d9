/**
 * Options of a grouping run: resolved once at the boundary, unknown keys
 * refused everywhere with the nearest known name, and library names shown as
 * flags through one table.
 */
import { describe, expect, it } from 'vitest';
import path from 'node:path';
import { resolveGroupOptions, type GroupOptions } from '../src/group-options.js';
import { checkValues, nearestName, type Constraints } from '../src/util/constraints.js';
import { resolveKMeansOptions } from '../src/cluster/kmeans.js';
import { flagFor } from '../src/cli/flag-names.js';
import { sheaf } from './helpers/cli.js';

const bad = (o: unknown): (() => unknown) => () => resolveGroupOptions(o as GroupOptions);

describe('resolveGroupOptions refuses unknown keys', () => {
  it('at the top level', () => {
    expect(bad({ grups: 8 })).toThrow('unknown option grups; did you mean groups?');
    expect(bad({ groups: 8, colour: 'red' })).toThrow(
      'unknown option colour; known: groups, minSimilarity, method, seed, choose, clean, analyzer, vectorize, kmeans, tree, label',
    );
  });

  it('in every stage, named with the stage', () => {
    expect(bad({ groups: 8, kmeans: { restart: 9 } })).toThrow('unknown option kmeans.restart; did you mean restarts?');
    expect(bad({ groups: 8, choose: { sample: 9 } })).toThrow('unknown option choose.sample; known: range, sampleSize, overGroups');
    expect(bad({ groups: 8, label: { term: 9 } })).toThrow('unknown option label.term; did you mean terms?');
    expect(bad({ groups: 8, tree: { memoryLimit: 9 } })).toThrow('unknown option tree.memoryLimit; known: memoryLimitBytes');
    expect(bad({ groups: 8, analyzer: { stemm: true } })).toThrow('unknown option analyzer.stemm; did you mean stem?');
    expect(bad({ groups: 8, vectorize: { mindf: 2 } })).toThrow('unknown option vectorize.mindf; did you mean minDf?');
    expect(bad({ groups: 8, kmeans: 3 })).toThrow('kmeans options must be an object; got 3');
  });

  it('k-means options on their own refuse unknown keys too', () => {
    expect(() => resolveKMeansOptions({ groups: 3, restart: 2 } as never, Infinity)).toThrow('unknown option restart; did you mean restarts?');
  });

  it('checks values once, with the seed at the top level', () => {
    expect(bad({ groups: 8, seed: -1 })).toThrow('seed must be a whole number from 0 to 4294967295; got -1');
    expect(bad({ groups: 8, choose: { sampleSize: 1 } })).toThrow('sampleSize must be a whole number >= 2; got 1');
    expect(bad({ minSimilarity: 1 })).toThrow('minSimilarity must be a number > -1 and < 1; got 1');
    expect(bad({ groups: 1 })).toThrow('groups must be a whole number >= 2; got 1');
  });

  it('returns a resolved object unchanged (resolved once)', () => {
    const r = resolveGroupOptions({ groups: 4 });
    expect(resolveGroupOptions(r)).toBe(r);
    expect(Object.isFrozen(r)).toBe(true);
  });
});

describe('constraint helper', () => {
  it('names the option, the allowed values and the bad value', () => {
    const c: Constraints<{ a: number; b: string; c: boolean; d: number }> = {
      a: { kind: 'whole', min: 1, max: 5 },
      b: { kind: 'choice', values: ['x', 'y'] },
      c: { kind: 'boolean' },
      d: { kind: 'number', min: 0 },
    };
    expect(() => checkValues({ a: 6, b: 'x', c: true, d: 0 }, c)).toThrow('a must be a whole number from 1 to 5; got 6');
    expect(() => checkValues({ a: 1, b: 'z', c: true, d: 0 }, c)).toThrow('b must be one of x, y; got "z"');
    expect(() => checkValues({ a: 1, b: 'x', c: 1 as unknown as boolean, d: 0 }, c)).toThrow('c must be true or false; got 1');
    expect(() => checkValues({ a: 1, b: 'x', c: false, d: Number.NaN }, c)).toThrow('d must be a number >= 0; got NaN');
    expect(() => checkValues({ a: 1, b: 'y', c: false, d: 2 }, c)).not.toThrow();
  });

  it('suggests only near names', () => {
    expect(nearestName('restart', ['restarts', 'seed'])).toBe('restarts');
    expect(nearestName('grups', ['groups', 'method'])).toBe('groups');
    expect(nearestName('colour', ['groups', 'method'])).toBeNull();
  });
});

describe('one table from library names to flags', () => {
  it('kebab case unless the table says otherwise, per command', () => {
    expect(flagFor('minDf')).toBe('--min-df');
    expect(flagFor('sampleSize', 'group')).toBe('--sample');
    expect(flagFor('threshold', 'group')).toBe('--duplicates');
    expect(flagFor('threshold', 'duplicates')).toBe('--threshold');
  });

  it('the CLI shows --sample for the sample size', async () => {
    const root = path.resolve(__dirname, '..');
    const run = await sheaf(['group', 'corpus-demo/notes', '--groups', 'auto', '--sample', '1', '--out', '/nonexistent/x'], { cwd: root });
    expect(run.stderr).toBe('sheaf: --sample must be a whole number >= 2; got 1\n');
    expect(run.code).toBe(2);
  });
});
