import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Doc } from '../src/types.js';
import { UsageError } from '../src/util/errors.js';
import { createRng } from '../src/util/random.js';
import { createAnalyzer } from '../src/analyze/index.js';
import { lineKeyReference } from '../src/clean/boilerplate.js';
import {
  cleanDocuments,
  DEFAULT_CLEAN_OPTIONS,
  findBoilerplate,
  foldIdentifiers,
  isGreeting,
  isSignOff,
  lineKey,
  PLACEHOLDERS,
  resolveCleanOptions,
  stripReplies,
  BOILERPLATE_MIN_KEY,
  type CleanOptions,
  type ReplyCounts,
} from '../src/clean/index.js';

const ALL = { quotes: true, signatures: true, greetings: true };

function strip(text: string): { text: string; counts: ReplyCounts } {
  const counts = { quoted: 0, history: 0, signature: 0, greeting: 0 };
  return { text: stripReplies(text, ALL, counts), counts };
}

function doc(id: string, text: string, fields: [string, string][] = []): Doc {
  return { id, source: `t.csv#${id}`, title: `title ${id}`, text, fields: new Map(fields) };
}

describe('reply history, quotes, signatures, greetings', () => {
  it('keeps only the new text of a thread with three quoted levels and a signature', () => {
    const thread = [
      'Hi team,',
      '',
      'The export still fails after the update to 4.2. The log says "disk quota exceeded".',
      '',
      'Thanks,',
      'Maria Lopez',
      'Operations, Lanternfen Houseboats',
      '',
      'On Tue, 4 Mar 2025 at 09:12, Support Desk <support@example.com> wrote:',
      '> Hello Maria,',
      '> please try again after updating to 4.2.',
      '>',
      '> On Mon, 3 Mar 2025 at 17:40, Maria Lopez <maria@example.org> wrote:',
      '>> The nightly export fails with an error.',
      '>>',
      '>> On Mon, 3 Mar 2025 at 08:00, Export Robot <robot@example.org> wrote:',
      '>>> Export job failed.',
      '>>> Please contact support.',
    ].join('\n');
    const r = strip(thread);
    expect(r.text).toBe('The export still fails after the update to 4.2. The log says "disk quota exceeded".');
    // The top attribution is history; the 9 non-blank lines under it start with ">" (deeper attributions included).
    expect(r.counts).toEqual({ quoted: 9, history: 1, signature: 3, greeting: 1 });
  });

  it('cuts top-posted history under reply headers in the seven languages', () => {
    const cases: [string, string][] = [
      ['en', 'On Mon, Mar 3, 2025 at 5:40 PM Maria Lopez <\nmaria@example.org> wrote:'],
      ['de', 'Am 03.03.2025 um 17:40 schrieb Maria Lopez <maria@example.org>:'],
      ['de', 'Maria Lopez schrieb am 03.03.2025 17:40:'],
      ['fr', 'Le lun. 3 mars 2025 à 17:40, Maria Lopez <maria@example.org> a écrit :'],
      ['es', 'El lun, 3 mar 2025 a las 17:40, Maria Lopez (<maria@example.org>) escribió:'],
      ['nl', 'Op ma 3 mrt. 2025 om 17:40 schreef Maria Lopez <maria@example.org>:'],
      ['nl', 'Op 3 maart 2025 heeft Maria Lopez het volgende geschreven:'],
      ['it', 'Il giorno lun 3 mar 2025 alle ore 17:40 Maria Lopez <maria@example.org> ha scritto:'],
      ['pt', 'Em seg., 3 de mar. de 2025 às 17:40, Maria Lopez <maria@example.org> escreveu:'],
      ['en', '-----Original Message-----\nFrom: Maria\nSent: Monday'],
      ['de', '-----Ursprüngliche Nachricht-----\nVon: Maria'],
      ['fr', '-------- Message d\'origine --------\nDe : Maria'],
      ['es', '-----Mensaje original-----'],
      ['nl', '-----Oorspronkelijk bericht-----'],
      ['it', '-----Messaggio originale-----'],
      ['pt', '-----Mensagem original-----'],
      ['en', '________________________________\nFrom: Maria Lopez <maria@example.org>\nSent: Monday, March 3, 2025 5:40 PM\nTo: Support'],
      ['de', 'Von: Maria Lopez\nGesendet: Montag, 3. März 2025 17:40\nAn: Support\nBetreff: Export'],
      ['fr', 'De : Maria Lopez\nEnvoyé : lundi 3 mars 2025 17:40\nÀ : Support'],
      ['es', 'De: Maria Lopez\nEnviado el: lunes, 3 de marzo de 2025 17:40\nPara: Soporte'],
      ['nl', 'Van: Maria Lopez\nVerzonden: maandag 3 maart 2025 17:40'],
      ['it', 'Da: Maria Lopez\nInviato: lunedì 3 marzo 2025 17:40'],
      ['pt', 'De: Maria Lopez\nEnviado: segunda-feira, 3 de março de 2025 17:40\nPara: Suporte'],
    ];
    for (const [lang, header] of cases) {
      const text = `The pump is fixed now.\n\n${header}\nThe pump makes a noise.\nIt started on Friday.`;
      expect({ lang, header, text: strip(text).text }).toEqual({ lang, header, text: 'The pump is fixed now.' });
    }
  });

  it('keeps answers written between quoted lines, and a "From:" line that starts no header block', () => {
    const r = strip('On Mon, 3 Mar 2025, Ann wrote:\n> Is the gate open?\nYes, since noon.\n> And the bridge?\nStill closed.');
    expect(r.text).toBe('Yes, since noon.\nStill closed.');
    expect(r.counts).toMatchObject({ quoted: 2, history: 1 });
    expect(strip('From: the harbour office we heard nothing.\nPlease chase them.').text).toBe(
      'From: the harbour office we heard nothing.\nPlease chase them.',
    );
    // "On … wrote" in running text is no header: it does not end with "wrote:".
    expect(strip('On Monday the skipper wrote: nothing. We waited.').text).toBe('On Monday the skipper wrote: nothing. We waited.');
  });

  it('removes signatures: the "-- " delimiter (RFC 3676 §4.3), sign-offs with a name block, phone lines', () => {
    expect(strip('The lock is stuck.\n-- \nJohn Smith\n+44 20 7946 0000\nhttps://example.com').text).toBe('The lock is stuck.');
    expect(strip('The lock is stuck.\n\nBest regards,\nJohn Smith\nSupport Lead\nACME Marine Ltd.').text).toBe('The lock is stuck.');
    expect(strip('Die Schleuse klemmt.\n\nMit freundlichen Grüßen\nMax Mustermann').text).toBe('Die Schleuse klemmt.');
    expect(strip('La écluse est bloquée.\nCordialement,\nJeanne').text).toBe('La écluse est bloquée.');
    expect(strip('Het slot klemt.\nMet vriendelijke groet,\nJan de Vries').text).toBe('Het slot klemt.');
    expect(strip('La chiusa è bloccata.\nCordiali saluti\nGiulia Rossi').text).toBe('La chiusa è bloccata.');
    expect(strip('A eclusa está presa.\nAtenciosamente,\nJoão Silva').text).toBe('A eclusa está presa.');
    expect(strip('La esclusa está atascada.\nUn saludo,\nAna').text).toBe('La esclusa está atascada.');
    expect(strip('The lock is stuck.\nThanks, Maria').text).toBe('The lock is stuck.');
    expect(strip('The lock is stuck.\n\nSent from my iPhone').text).toBe('The lock is stuck.');
    expect(strip('Die Schleuse klemmt.\n\nVon meinem iPhone gesendet').text).toBe('Die Schleuse klemmt.');
    // Not signatures: a sign-off word starting a sentence, a long line after the sign-off.
    expect(strip('Thanks, that fixed it.').text).toBe('Thanks, that fixed it.');
    const long = 'Thanks,\nbut the second gate still does not open when the water is high, even after the reset you suggested.';
    expect(strip(long).text).toBe(long);
    expect(isSignOff('Kind regards,')).toBe(true);
    expect(isSignOff('Best, Tom Jones')).toBe(true);
    expect(isSignOff('Best, that was it')).toBe(false);
    expect(isSignOff('Regards to your team from all of us')).toBe(false);
  });

  it('removes an opening greeting line only', () => {
    for (const g of ['Hi team,', 'Hello,', 'Dear Support Team,', 'Dear Sir or Madam,', 'Good morning!', 'Hallo zusammen,', 'Sehr geehrte Damen und Herren,', 'Bonjour,', 'Hola a todos:', 'Beste Jan,', 'Buongiorno,', 'Olá,', 'Hi']) {
      expect({ g, greeting: isGreeting(g) }).toEqual({ g, greeting: true });
    }
    for (const g of ['Hi, my printer is broken', 'Hello world program fails to compile.', 'Dear me, what a mess this invoice is, truly a mess.', 'Highway closed']) {
      expect({ g, greeting: isGreeting(g) }).toEqual({ g, greeting: false });
    }
    expect(strip('Hi team,\nHello, is anyone there?').text).toBe('Hello, is anyone there?');
  });
});

describe('placeholders', () => {
  it('folds URLs, addresses, ids and long numbers into placeholder words', () => {
    const counts = { url: 0, email: 0, id: 0, number: 0 };
    const out = foldIdentifiers(
      'See https://help.example.com/a/b?x=1&y=2. Or www.example.org, mail me at maria.lopez+desk@example.co.uk or mailto:a@b.io; ' +
        'ticket INC0012345, order ORD-48213 and TCK-2024-0042, case #4411, trace 3f2c9a7e-1b4d-4e8f-9a6b-2c7d8e9f0a1b, ' +
        'hash 9f86d081884c7d659a2feaa0c55ad015, key a1b2c3d4e5f6a7b8, call 4402079460000; keep mp3, x86, 2024, 3.14159, &#8364; and 1,234.',
      counts,
    );
    expect(out).toBe(
      'See xurlx. Or xurlx, mail me at xmailx or xmailx; ticket xidx, order xidx and xidx, case xidx, trace xidx, ' +
        'hash xidx, key xidx, call xnumx; keep mp3, x86, 2024, 3.14159, &#8364; and 1,234.',
    );
    expect(counts).toEqual({ url: 2, email: 2, id: 7, number: 1 });
  });

  it('are single terms the analyzer keeps as they are with junk: false, in its main languages, and drops by default', () => {
    const words = Object.values(PLACEHOLDERS);
    for (const lang of ['en', 'de', 'fr', 'es', 'nl', 'it', 'pt']) {
      expect(createAnalyzer({ lang, junk: false }).analyze(words.join(' '))).toEqual(words);
      // By default they are junk: they stand for links, addresses and numbers and name nothing.
      expect(createAnalyzer({ lang }).analyze(words.join(' '))).toEqual([]);
    }
  });
});

describe('boilerplate', () => {
  it('finds a planted footer in a generated corpus with the right count, and keeps the other lines', () => {
    const rng = createRng(7);
    const words = ['pump', 'leak', 'hull', 'engine', 'refund', 'booking', 'mooring', 'battery', 'toilet', 'heater', 'rudder', 'cabin', 'deposit', 'lock', 'bridge', 'fuel'];
    const sentence = (): string => Array.from({ length: 6 + rng.int(5) }, () => words[rng.int(words.length)]).join(' ') + '.';
    const docs: Doc[] = [];
    let planted = 0;
    let common = 0;
    for (let i = 0; i < 300; i++) {
      const lines = [sentence(), sentence()];
      if (rng.next() < 0.6) {
        planted++;
        // The footer carries the ticket number: the digits differ, the line is the same.
        lines.push(`Ticket #${1000 + i} - please reply above this line to reach Lanternfen support.`);
      }
      if (rng.next() < 0.1) {
        common++;
        lines.push('The heater in cabin two does not start in the morning.');
      }
      docs.push(doc(String(i), lines.join('\n')));
    }
    const { docs: out, report } = cleanDocuments(docs, { boilerplateShare: 0.2, boilerplateMinDocs: 5 });
    expect(planted).toBeGreaterThan(150);
    expect(common).toBeGreaterThan(10);
    expect(common).toBeLessThan(60); // below the 20% threshold (60 of 300)
    expect(report.boilerplate).toEqual({
      threshold: { share: 0.2, minDocs: 5, docs: 60 },
      found: 1,
      lines: [{ line: 'Ticket #1000 - please reply above this line to reach Lanternfen support.', docs: planted }],
    });
    expect(report.linesRemoved.boilerplate).toBe(planted);
    expect(out.every((d) => !d.text.includes('please reply above this line'))).toBe(true);
    expect(out.filter((d) => d.text.includes('The heater in cabin two does not start in the morning.')).length).toBe(common);
    // Every other line is kept as it was (no identifiers in them to fold).
    for (let i = 0; i < docs.length; i++) {
      const kept = (docs[i] as Doc).text.split('\n').filter((l) => !l.startsWith('Ticket #'));
      expect((out[i] as Doc).text).toBe(kept.join('\n'));
    }
  });

  it('keys lines in one pass exactly as the regular-expression reference does (fast-check)', () => {
    const text = fc.string({ unit: fc.constantFrom('a', 'Z', 'é', 'Ä', '7', '٣', '²', ' ', '-', '#', '\u0301', '😀', '\ud800', 'ß', 'İ', '.', '\t'), maxLength: 40 });
    fc.assert(
      fc.property(fc.oneof(text, fc.string({ unit: 'binary', maxLength: 40 })), (s) => {
        expect(lineKey(s)).toBe(lineKeyReference(s));
      }),
      { numRuns: 2000, seed: 12 },
    );
    expect(lineKey('  Ticket #4411 – reply ABOVE this line!! ')).toBe('ticket 0 reply above this line');
  });

  it('finds exactly the lines a naive count finds (fast-check), in bounded memory', () => {
    const line = fc.constantFrom(
      'the engine will not start',
      'please reply above this line',
      'refund for the cancelled booking',
      'battery drains overnight again',
      'short',
      'mooring fees seem wrong to me',
      'Ticket 12 closed by the desk',
      'Ticket 9981 closed by the desk',
    );
    // Many distinct lines as well, so the summary fills up and its counters are decremented.
    const w = fc.constantFrom('alpha', 'bravo', 'charlie', 'delta', 'echo', 'foxtrot', 'golf', 'hotel', 'india', 'juliet', 'kilo', 'lima');
    const rare = fc.tuple(w, w, w).map(([a, b, c]) => `${a} ${b} ${c} note`);
    const corpus = fc.array(fc.array(fc.oneof(line, rare, rare), { maxLength: 8 }).map((ls) => ls.join('\n')), { minLength: 1, maxLength: 80 });
    fc.assert(
      fc.property(corpus, fc.integer({ min: 2, max: 12 }), (texts, minDocs) => {
        const naive = new Map<string, { line: string; docs: number }>();
        for (const t of texts) {
          const seen = new Set<string>();
          for (const l of t.split('\n')) {
            const k = lineKey(l);
            if (l.length < BOILERPLATE_MIN_KEY || k.length < BOILERPLATE_MIN_KEY || seen.has(k)) continue;
            seen.add(k);
            const e = naive.get(k) ?? { line: l.trim(), docs: 0 };
            e.docs++;
            naive.set(k, e);
          }
        }
        const expected = [...naive]
          .filter(([, e]) => e.docs >= minDocs)
          .map(([key, e]) => ({ key, line: e.line, docs: e.docs }))
          .sort((a, b) => b.docs - a.docs || (a.key < b.key ? -1 : 1));
        expect(findBoilerplate(texts, minDocs)).toEqual(expected);
      }),
      { numRuns: 300, seed: 11 },
    );
  });
});

describe('cleanDocuments', () => {
  const tickets: Doc[] = [
    doc('1', 'Hello,\nThe fridge is warm. Order ORD-55120.\n\nKind regards,\nTom', [['subject', 'Fridge']]),
    doc('2', 'The fridge is still warm, see https://example.com/p/1.\n\nOn Mon, 3 Mar 2025, Desk <d@example.com> wrote:\n> Did you reset it?'),
    doc('3', '> only a quote, nothing new'),
    doc('4', 'Nothing to clean here.'),
  ];

  it('reports what it removed, per rule, and keeps titles, fields and documents it would empty', () => {
    const { docs, report } = cleanDocuments(tickets);
    expect(docs.map((d) => d.text)).toEqual([
      'The fridge is warm. Order xidx.',
      'The fridge is still warm, see xurlx.',
      '> only a quote, nothing new',
      'Nothing to clean here.',
    ]);
    expect(docs.map((d) => [d.id, d.title, d.source])).toEqual(tickets.map((d) => [d.id, d.title, d.source]));
    expect(docs[0]?.fields).toBe(tickets[0]?.fields);
    expect(docs[3]).toBe(tickets[3]); // unchanged documents are passed through
    const before = tickets.reduce((s, d) => s + d.text.length, 0);
    const after = docs.reduce((s, d) => s + d.text.length, 0);
    expect(report).toEqual({
      mode: 'tickets',
      options: DEFAULT_CLEAN_OPTIONS,
      documents: 4,
      changed: 2,
      withClutter: 2, // rows 1 (greeting, signature) and 2 (history, quote); row 3 is kept whole
      keptWhole: 1,
      charsBefore: before,
      charsAfter: after,
      linesRemoved: { quoted: 1, history: 1, signature: 2, greeting: 1, boilerplate: 0 },
      placeholders: { url: 1, email: 0, id: 1, number: 0 },
      boilerplate: { threshold: { share: 0.2, minDocs: 5, docs: 5 }, found: 0, lines: [] },
    });
    expect(tickets[1]?.text.startsWith('The fridge is still warm, see https://')).toBe(true); // input untouched
  });

  it('in mode none returns the documents as they are', () => {
    const { docs, report } = cleanDocuments(tickets, { mode: 'none' });
    expect(docs).toEqual(tickets);
    expect(docs.every((d, i) => d === tickets[i])).toBe(true);
    expect(report).toMatchObject({ mode: 'none', changed: 0, charsAfter: report.charsBefore, linesRemoved: { quoted: 0, boilerplate: 0 } });
  });

  it('cleans only the documents selected, passing the others through', () => {
    const { docs, report } = cleanDocuments(tickets, {}, Uint8Array.from([1, 0, 1, 0]));
    expect(docs[0]?.text).toBe('The fridge is warm. Order xidx.');
    expect(docs[1]).toBe(tickets[1]);
    expect(docs[3]).toBe(tickets[3]);
    expect(report).toMatchObject({ documents: 2, changed: 1, keptWhole: 1 });
    expect(() => cleanDocuments(tickets, {}, [1, 0])).toThrow(new RangeError('cleanDocuments: only has 2 entries for 4 documents'));
  });

  it('turns rules off one by one', () => {
    const t = [doc('1', 'Hi,\nSee www.example.com\n> quoted\n-- \nsig')];
    expect(cleanDocuments(t, { quotes: false }).docs[0]?.text).toBe('See xurlx\n> quoted');
    expect(cleanDocuments(t, { signatures: false }).docs[0]?.text).toBe('See xurlx\n--\nsig'); // trailing spaces go
    expect(cleanDocuments(t, { greetings: false }).docs[0]?.text).toBe('Hi,\nSee xurlx');
    expect(cleanDocuments(t, { placeholders: false }).docs[0]?.text).toBe('See www.example.com');
  });

  it('validates its options once, with exact messages', () => {
    const fails = (partial: Record<string, unknown>): UsageError => {
      try {
        resolveCleanOptions(partial as Partial<CleanOptions>);
      } catch (err) {
        expect(err).toBeInstanceOf(UsageError);
        return err as UsageError;
      }
      throw new Error('expected a UsageError');
    };
    const cases: [Record<string, unknown>, string, string | undefined][] = [
      [{ mode: 'emails' }, 'clean mode must be one of tickets, none; got "emails"', 'mode'],
      [{ quotes: 'yes' }, 'quotes must be true or false; got "yes"', 'quotes'],
      [{ boilerplateShare: 0 }, 'boilerplateShare must be a fraction in (0, 1] of the documents; got 0', 'boilerplateShare'],
      [{ boilerplateShare: 1.5 }, 'boilerplateShare must be a fraction in (0, 1] of the documents; got 1.5', 'boilerplateShare'],
      [{ boilerplateMinDocs: 1 }, 'boilerplateMinDocs must be a whole number >= 2; got 1', 'boilerplateMinDocs'],
      [{ boilerplateMinDocs: 2.5 }, 'boilerplateMinDocs must be a whole number >= 2; got 2.5', 'boilerplateMinDocs'],
      [{ colour: 'red' }, 'unknown clean option "colour"; allowed: mode, quotes, signatures, greetings, boilerplate, boilerplateShare, boilerplateMinDocs, placeholders', 'colour'],
    ];
    for (const [partial, message, option] of cases) {
      const e = fails(partial);
      expect(e.message).toBe(message);
      expect(e.option).toBe(option);
    }
    expect(resolveCleanOptions({ mode: undefined })).toEqual(DEFAULT_CLEAN_OPTIONS);
    expect(() => cleanDocuments([], { mode: 'x' as never })).toThrow(UsageError);
  });

  it('removes a footer under a signature as boilerplate, then the signature', () => {
    const parts = ['gate', 'pump', 'hatch', 'tiller', 'winch', 'cleat'];
    const t = parts.map((p, i) => doc(String(i), `The ${p} sticks.\n\nThanks,\nAnn\nReply above this line to reach Lanternfen support (ticket ${i}).`));
    const { docs, report } = cleanDocuments(t);
    expect(docs.map((d) => d.text)).toEqual(parts.map((p) => `The ${p} sticks.`));
    expect(report.linesRemoved).toEqual({ quoted: 0, history: 0, signature: 12, greeting: 0, boilerplate: 6 });
    expect(report.boilerplate.lines).toEqual([{ line: 'Reply above this line to reach Lanternfen support (ticket 0).', docs: 6 }]);
  });

  it('gives the same output for the same input, whatever the line endings', () => {
    const crlf = tickets.map((d) => ({ ...d, text: d.text.replace(/\n/g, '\r\n') }));
    expect(cleanDocuments(crlf).docs.map((d) => d.text).slice(0, 2)).toEqual(cleanDocuments(tickets).docs.map((d) => d.text).slice(0, 2));
  });
});
