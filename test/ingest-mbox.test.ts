/**
 * Mailboxes (.mbox) split into messages. The mailboxes are written here from
 * RFC 4155 §2 (and Appendix A on the quoting of From_ lines): each message
 * starts with a From_ line (`From sender asctime-date`), ends with an empty
 * line, and a body line starting with `From ` is written as `>From `.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { ingest } from '../src/ingest/index.js';
import { splitMbox, looksLikeMbox } from '../src/ingest/mbox.js';
import { put, tmp } from './helpers/files.js';

const MBOX = [
  'From ana@example.org Tue Nov  3 09:14:07 2026',
  'From: Ana <ana@example.org>',
  'Subject: Boiler noise',
  'Date: Tue, 3 Nov 2026 09:14:07 +0000',
  '',
  'The boiler hums at night.',
  '>From the cellar it sounds worse.',
  '>>From here on, quoted twice.',
  '',
  'From ben@example.org Tue Nov  3 10:02:00 2026',
  'From: Ben <ben@example.org>',
  'Subject: =?ISO-8859-1?Q?Caf=E9_order?=',
  'Content-Type: text/plain; charset=iso-8859-1',
  'Content-Transfer-Encoding: quoted-printable',
  '',
  'Two caf=E9 cr=E8me, please.',
  '',
  'From carl@example.org Wed Nov  4 08:00:00 2026',
  'From: Carl <carl@example.org>',
  'Subject: Empty body',
  '',
  '',
  'From dora@example.org Wed Nov  4 08:30:00 2026',
  'From: Dora <dora@example.org>',
  'Subject: Last one',
  '',
  'Without the closing empty line.',
].join('\n');

describe('mailboxes (RFC 4155)', () => {
  it('splits at From_ lines and unquotes >From lines, keeping each message\'s bytes', () => {
    const m = splitMbox(Buffer.from(MBOX + '\n', 'latin1'));
    expect(m?.map((x) => [x.index, x.line])).toEqual([
      [1, 1],
      [2, 10],
      [3, 18],
      [4, 23],
    ]);
    expect(m?.[0]?.bytes.toString('latin1')).toBe(
      'From: Ana <ana@example.org>\nSubject: Boiler noise\nDate: Tue, 3 Nov 2026 09:14:07 +0000\n\nThe boiler hums at night.\nFrom the cellar it sounds worse.\n>From here on, quoted twice.\n',
    );
    expect(m?.[3]?.bytes.toString('latin1')).toBe('From: Dora <dora@example.org>\nSubject: Last one\n\nWithout the closing empty line.\n');
  });

  it('reads each message as an e-mail document, ids file.mbox#N', async () => {
    const dir = tmp();
    put(dir, 'inbox.mbox', Buffer.from(MBOX.replace(/\n/g, '\r\n') + '\r\n', 'latin1'));
    const r = await ingest(['inbox.mbox'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.source, d.title, d.text])).toEqual([
      ['inbox.mbox#1', 'inbox.mbox#1', 'Boiler noise', 'The boiler hums at night.\nFrom the cellar it sounds worse.\n>From here on, quoted twice.'],
      ['inbox.mbox#2', 'inbox.mbox#2', 'Café order', 'Two café crème, please.'],
      ['inbox.mbox#4', 'inbox.mbox#4', 'Last one', 'Without the closing empty line.'],
    ]);
    expect(r.skipped).toEqual([{ source: 'inbox.mbox#3', reason: 'no text: the e-mail has an empty body' }]);
    expect([...r.exportRows]).toEqual([0, 0, 0]);
    expect(r.decoding).toEqual([{ source: 'inbox.mbox#2', encoding: 'windows-1252', basis: 'mime', replaced: 0 }]);
    expect(r.inputs.map((i) => [i.path, i.kind])).toEqual([['inbox.mbox', 'file']]);
  });

  it('a From line inside a body without an empty line before it and without the full shape stays in the message', () => {
    const box = 'From a@example.org Mon Nov  2 07:00:00 2026\nSubject: x\n\nline\nFrom me, with thanks\n';
    expect(splitMbox(Buffer.from(box))?.map((x) => x.bytes.toString())).toEqual(['Subject: x\n\nline\nFrom me, with thanks\n']);
  });

  it('skips an .mbox that does not start with a From_ line, and sniffs a mailbox without extension', async () => {
    const dir = tmp();
    put(dir, 'bad.mbox', 'Subject: not a mailbox\n\nhello\n');
    put(dir, 'Inbox', MBOX);
    const r = await ingest(['bad.mbox', 'Inbox'], {}, { cwd: dir });
    expect(r.skipped).toEqual([
      { source: 'bad.mbox', reason: 'not a mailbox: it does not start with a From_ line (RFC 4155)' },
      { source: 'Inbox#3', reason: 'no text: the e-mail has an empty body' },
    ]);
    expect(r.docs.map((d) => d.id)).toEqual(['Inbox#1', 'Inbox#2', 'Inbox#4']);
    expect(looksLikeMbox(Buffer.from('From the desk of the editor\nhello\n'))).toBe(false);
  });

  it('splits a mailbox inside a folder too (read by default), ids rel#N', async () => {
    const dir = tmp();
    put(dir, 'mail/2026/inbox.mbox', MBOX);
    put(dir, 'mail/notes.txt', 'a plain note');
    put(dir, 'mail/empty.mbox', 'no From_ line here\n');
    const r = await ingest(['mail'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.id, d.source, d.title])).toEqual([
      ['2026/inbox.mbox#1', 'mail/2026/inbox.mbox#1', 'Boiler noise'],
      ['2026/inbox.mbox#2', 'mail/2026/inbox.mbox#2', 'Café order'],
      ['2026/inbox.mbox#4', 'mail/2026/inbox.mbox#4', 'Last one'],
      ['notes.txt', 'mail/notes.txt', 'a plain note'],
    ]);
    expect(r.skipped).toEqual([
      { source: 'mail/2026/inbox.mbox#3', reason: 'no text: the e-mail has an empty body' },
      { source: 'mail/empty.mbox', reason: 'not a mailbox: it does not start with a From_ line (RFC 4155)' },
    ]);
    expect(r.inputs[0]?.files).toBe(3);
  });

  it('gives back any messages written as an mboxrd mailbox (RFC 4155 App. A quoting), on random messages', () => {
    const line = fc.oneof(
      fc.constantFrom('', 'From here on', '>From quoted once', '>>From twice', 'From', 'plain text', ' From indented'),
      fc.string({ maxLength: 12 }).map((x) => x.replace(/[\r\n]/g, ' ')),
    );
    const message = fc.array(line, { minLength: 1, maxLength: 8 }).map((ls) => ['Subject: s', '', ...ls].join('\n') + '\n');
    fc.assert(
      fc.property(fc.array(message, { minLength: 1, maxLength: 5 }), (messages) => {
        // Writing: a From_ line, every line matching >*From quoted with one more >, an empty line after each message.
        const box = messages
          .map((m) => 'From someone@example.org Mon Nov  2 07:00:00 2026\n' + m.replace(/^(>*From )/gm, '>$1') + '\n')
          .join('');
        const got = splitMbox(Buffer.from(box, 'utf8'))?.map((x) => x.bytes.toString('utf8'));
        expect(got).toEqual(messages);
      }),
      { seed: 4155, numRuns: 300 },
    );
  });
});
