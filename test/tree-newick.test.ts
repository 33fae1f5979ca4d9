import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { newickLabel, toNewick } from '../src/cluster/newick.js';
import { documentAverageLink, type Dendrogram } from '../src/cluster/tree.js';
import type { Csr } from '../src/types.js';

/** Minimal Newick reader for the checks: labels (quoted or bare) and branch lengths. */
interface Parsed {
  name: string | null;
  length: number | null;
  children: Parsed[];
}
function parseNewick(text: string): Parsed {
  let at = 0;
  const label = (): string => {
    if (text[at] === "'") {
      let out = '';
      at++;
      for (;;) {
        if (at >= text.length) throw new Error('unterminated quote');
        if (text[at] === "'") {
          if (text[at + 1] === "'") {
            out += "'";
            at += 2;
            continue;
          }
          at++;
          return out;
        }
        out += text[at++];
      }
    }
    const start = at;
    while (at < text.length && !"(),:;".includes(text[at]!)) at++;
    return text.slice(start, at).replace(/_/gu, ' ');
  };
  const node = (): Parsed => {
    const children: Parsed[] = [];
    let name: string | null = null;
    if (text[at] === '(') {
      at++;
      children.push(node());
      while (text[at] === ',') {
        at++;
        children.push(node());
      }
      if (text[at] !== ')') throw new Error(`expected ) at ${at}`);
      at++;
    } else name = label();
    let length: number | null = null;
    if (text[at] === ':') {
      at++;
      const start = at;
      while (at < text.length && /[0-9.eE+-]/u.test(text[at]!)) at++;
      length = Number(text.slice(start, at));
    }
    return { name, length, children };
  };
  const root = node();
  if (text.slice(at) !== ';') throw new Error(`trailing text ${JSON.stringify(text.slice(at))}`);
  return root;
}

describe('toNewick', () => {
  // hand-made tree: (a,b) at similarity 0.9, (c,d) at 0.8, both at 0.3.
  // Heights (1 - similarity, not halved): 0.1, 0.2, 0.7; branch = parent height - child height.
  const tree: Dendrogram = {
    leaves: 4,
    left: Int32Array.from([0, 2, 4]),
    right: Int32Array.from([1, 3, 5]),
    similarity: Float64Array.from([0.9, 0.8, 0.3]),
    size: Int32Array.from([2, 2, 4]),
  };

  it('writes a hand-checked tree', () => {
    expect(toNewick(tree, ['a', 'b', 'c', 'd'])).toBe('((a:0.1,b:0.1):0.6,(c:0.2,d:0.2):0.5);');
  });

  it('quotes names with blanks, quotes, colons, parentheses and the other reserved characters', () => {
    expect(toNewick(tree, ["O'Brien", 'a:b', 'f(x)', 'two words'])).toBe(
      "(('O''Brien':0.1,'a:b':0.1):0.6,('f(x)':0.2,'two words':0.2):0.5);",
    );
    expect(newickLabel('plain-name.txt')).toBe('plain-name.txt');
    expect(newickLabel('')).toBe("''");
    expect(newickLabel('snake_case')).toBe("'snake_case'");
    expect(newickLabel('[note]')).toBe("'[note]'");
    expect(newickLabel('a;b,c')).toBe("'a;b,c'");
    expect(newickLabel("''")).toBe("''''''");
    expect(newickLabel('tab\there')).toBe("'tab\there'");
  });

  it('handles 0 and 1 leaves and rejects a wrong number of names', () => {
    expect(toNewick({ leaves: 0, left: new Int32Array(0), right: new Int32Array(0), similarity: new Float64Array(0), size: new Int32Array(0) }, [])).toBe(';');
    expect(toNewick({ leaves: 1, left: new Int32Array(0), right: new Int32Array(0), similarity: new Float64Array(0), size: new Int32Array(0) }, ["x'y"])).toBe("'x''y';");
    expect(() => toNewick(tree, ['a'])).toThrow('toNewick: 1 names for 4 leaves');
  });

  it('round-trips arbitrary names and is ultrametric on a scipy fixture tree', () => {
    const c = (
      JSON.parse(readFileSync(new URL('./fixtures/tree/linkage.json', import.meta.url), 'utf8')) as {
        cases: { name: string; matrix: { rows: number; cols: number; indptr: number[]; indices: number[]; values: number[] } }[];
      }
    ).cases.find((x) => x.name === 'n30')!;
    const m: Csr = {
      rows: c.matrix.rows,
      cols: c.matrix.cols,
      indptr: Int32Array.from(c.matrix.indptr),
      indices: Int32Array.from(c.matrix.indices),
      values: Float32Array.from(c.matrix.values),
    };
    const t = documentAverageLink(m);
    const rootHeight = 1 - t.similarity[t.leaves - 2]!;
    // leaf order of a left-first walk of the tree
    const order: number[] = [];
    const visit = (id: number): void => {
      if (id < t.leaves) order.push(id);
      else {
        visit(t.left[id - t.leaves]!);
        visit(t.right[id - t.leaves]!);
      }
    };
    visit(2 * t.leaves - 2);
    fc.assert(
      fc.property(
        fc.array(fc.string({ unit: fc.constantFrom('a', 'Z', ' ', "'", ':', '(', ')', '[', ']', ';', ',', '_', 'é', '"') }), {
          minLength: 30,
          maxLength: 30,
        }),
        (names) => {
          const parsed = parseNewick(toNewick(t, names));
          const seen: string[] = [];
          const walk = (p: Parsed, depth: number): void => {
            if (p.children.length === 0) {
              seen.push(p.name!);
              // every root-to-leaf path has length = root height (lengths written to 1e-10)
              expect(Math.abs(depth - rootHeight)).toBeLessThan(1e-8);
              return;
            }
            expect(p.children.length).toBe(2);
            for (const ch of p.children) walk(ch, depth + ch.length!);
          };
          walk(parsed, 0);
          expect(parsed.length).toBeNull();
          expect(seen).toEqual(order.map((leaf) => names[leaf]!));
        },
      ),
      { numRuns: 100, seed: 3 },
    );
  });
});
