import { describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import iconv from 'iconv-lite';
import { ingest } from '../src/ingest/index.js';
import {
  decodeBase64,
  decodeEncodedWords,
  decodeQuotedPrintable,
  looksLikeMail,
  parseParams,
  readMail,
  splitHeader,
  splitMultipart,
  unflow,
} from '../src/ingest/mail.js';
import { put } from './helpers/files.js';

const crlf = (lines: string[]): Buffer => Buffer.from(lines.join('\r\n'), 'latin1');
const b64 = (s: string, enc: BufferEncoding = 'utf8'): string => Buffer.from(s, enc).toString('base64');

describe('RFC 2047 encoded words', () => {
  it('decodes the examples of RFC 2047 §8 (from memory)', () => {
    expect(decodeEncodedWords('=?US-ASCII?Q?Keith_Moore?= <moore@cs.utk.edu>')).toBe('Keith Moore <moore@cs.utk.edu>');
    expect(decodeEncodedWords('=?ISO-8859-1?Q?Keld_J=F8rn_Simonsen?= <keld@dkuug.dk>')).toBe('Keld Jørn Simonsen <keld@dkuug.dk>');
    expect(decodeEncodedWords('=?ISO-8859-1?Q?Andr=E9?= Pirard <PIRARD@vm1.ulg.ac.be>')).toBe('André Pirard <PIRARD@vm1.ulg.ac.be>');
    // Two words in two charsets, folded onto two lines; the white space between them is not text.
    const { fields } = splitHeader(
      'Subject: =?ISO-8859-1?B?SWYgeW91IGNhbiByZWFkIHRoaXMgeW8=?=\r\n    =?ISO-8859-2?B?dSB1bmRlcnN0YW5kIHRoZSBleGFtcGxlLg==?=\r\n\r\n',
    );
    expect(decodeEncodedWords(fields[0]?.value ?? '').trim()).toBe('If you can read this you understand the example.');
    // The table of §8: white space between adjacent encoded words is dropped, other text kept.
    const table: [string, string][] = [
      ['(=?ISO-8859-1?Q?a?=)', '(a)'],
      ['(=?ISO-8859-1?Q?a?= b)', '(a b)'],
      ['(=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=)', '(ab)'],
      ['(=?ISO-8859-1?Q?a?=  =?ISO-8859-1?Q?b?=)', '(ab)'],
      ['(=?ISO-8859-1?Q?a?=\r\n    =?ISO-8859-1?Q?b?=)', '(ab)'],
      ['(=?ISO-8859-1?Q?a_b?=)', '(a b)'],
      ['(=?ISO-8859-1?Q?a?= =?ISO-8859-2?Q?_b?=)', '(a b)'],
    ];
    for (const [encoded, shown] of table) expect(decodeEncodedWords(encoded)).toBe(shown);
  });

  it('joins a UTF-8 character split across two words, keeps an unknown charset as written, reads RFC 6532 UTF-8', () => {
    // "é" is C3 A9; a sloppy client put C3 at the end of one word and A9 at the start of the next.
    expect(decodeEncodedWords('=?UTF-8?Q?caf=C3?= =?UTF-8?Q?=A9_cr=C3=A8me?=')).toBe('café crème');
    expect(decodeEncodedWords('=?x-unknown?Q?abc?= and more')).toBe('=?x-unknown?Q?abc?= and more');
    expect(decodeEncodedWords(Buffer.from('Grüße', 'utf8').toString('latin1'))).toBe('Grüße');
    expect(decodeEncodedWords('=?utf-8*en?B?' + b64('Hello ☺') + '?=')).toBe('Hello ☺'); // RFC 2231 §5 language suffix
  });
});

describe('MIME parameters and bodies', () => {
  it('parses parameters with quotes, comments and the RFC 2231 examples (§3, §4; from memory)', () => {
    const ct = parseParams('text/plain; charset="ISO-8859-1" (a comment); format=flowed');
    expect(ct.value).toBe('text/plain');
    expect([...ct.params]).toEqual([
      ['charset', 'ISO-8859-1'],
      ['format', 'flowed'],
    ]);
    expect(parseParams("application/x-stuff; title*=us-ascii'en-us'This%20is%20%2A%2A%2Afun%2A%2A%2A").params.get('title')).toBe('This is ***fun***');
    expect(
      parseParams(
        "application/x-stuff; title*0*=us-ascii'en'This%20is%20even%20more%20; title*1*=%2A%2A%2Afun%2A%2A%2A%20; title*2=\"isn't it!\"",
      ).params.get('title'),
    ).toBe("This is even more ***fun*** isn't it!");
    expect(parseParams("attachment; filename*=utf-8''r%C3%A9sum%C3%A9.pdf").params.get('filename')).toBe('résumé.pdf');
    expect(parseParams('attachment; filename="a \\"quoted\\" name.txt"').params.get('filename')).toBe('a "quoted" name.txt');
  });

  it('decodes quoted-printable as RFC 2045 §6.7 says: soft breaks, =XX, trailing white space dropped', () => {
    // The example of RFC 2045 §6.7 rule 5 (from memory).
    expect(decodeQuotedPrintable("Now's the time =\r\nfor all folk to come=\r\n to the aid of their country.").toString('latin1')).toBe(
      "Now's the time for all folk to come to the aid of their country.",
    );
    expect(decodeQuotedPrintable('caf=E9 =3D equal   \r\nnext=\r\n').toString('latin1')).toBe('caf\xe9 = equal\nnext');
    expect(decodeQuotedPrintable('lone = sign and =ZZ').toString('latin1')).toBe('lone = sign and =ZZ');
    expect(decodeBase64('SGVs\r\nbG8g*d29y\nbGQ=').toString()).toBe('Hello world');
  });

  it('splits multipart bodies at the boundary lines, ignoring preamble and epilogue (RFC 2046 §5.1.1)', () => {
    const body = 'preamble\r\n--xyz\r\n\r\none\r\n--xyz  \r\nContent-Type: text/plain\r\n\r\ntwo\r\n\r\n--xyz--\r\nepilogue\r\n';
    expect(splitMultipart(body, 'xyz')).toEqual(['\r\none', 'Content-Type: text/plain\r\n\r\ntwo\r\n']);
    expect(splitMultipart('no boundary here', 'xyz')).toBeNull();
    // A longer boundary that starts with the same characters is not this one.
    expect(splitMultipart('--xyz\r\na\r\n--xyz-2\r\nb\r\n--xyz--', 'xyz')).toEqual(['a\r\n--xyz-2\r\nb']);
  });

  it('undoes format=flowed (RFC 3676 §4), keeping quote depth and the signature separator', () => {
    expect(unflow('This is a \nflowed line.\n> quoted \n> too\n-- \nSig', false)).toBe('This is a flowed line.\n> quoted too\n-- \nSig');
    expect(unflow(' >not a quote, stuffed', false)).toBe('>not a quote, stuffed');
    expect(unflow('split wo \nrd', true)).toBe('split word');
  });
});

describe('messages', () => {
  it('reads a quoted-printable Latin-1 message with an encoded-word subject', () => {
    const m = readMail(
      crlf([
        'From: =?ISO-8859-1?Q?Andr=E9?= Pirard <andre@example.org>',
        'To: support@example.com',
        'Subject: =?UTF-8?B?' + b64('Réservation annulée') + '?=',
        'Date: Tue, 4 Mar 2025 09:12:00 +0100',
        'MIME-Version: 1.0',
        'Content-Type: text/plain; charset=ISO-8859-1',
        'Content-Transfer-Encoding: quoted-printable',
        '',
        'Bonjour,',
        '',
        'ma r=E9servation du 12 mars a =E9t=E9 annul=E9e sans pr=E9avis. Pourriez-vous v=',
        '=E9rifier ?',
        '',
      ]),
    );
    expect(m.subject).toBe('Réservation annulée');
    expect(m.text).toBe('Bonjour,\n\nma réservation du 12 mars a été annulée sans préavis. Pourriez-vous vérifier ?');
    expect(m).toMatchObject({ source: 'plain', attachments: [], encodings: ['windows-1252'], replaced: 0, warnings: [] });
  });

  it('prefers text/plain in multipart/alternative, counts attachments in multipart/mixed', () => {
    const m = readMail(
      crlf([
        'From: a@example.org',
        'Subject: Invoice',
        'MIME-Version: 1.0',
        'Content-Type: multipart/mixed; boundary="outer"',
        '',
        'This is a multi-part message in MIME format.',
        '--outer',
        'Content-Type: multipart/alternative; boundary=inner',
        '',
        '--inner',
        'Content-Type: text/plain; charset=utf-8',
        'Content-Transfer-Encoding: base64',
        '',
        b64('Please find the invoice attached.\r\nTotal: 42 €'),
        '--inner',
        'Content-Type: text/html; charset=utf-8',
        '',
        '<p>Please find the <b>invoice</b> attached.</p>',
        '--inner--',
        '--outer',
        'Content-Type: application/pdf; name="invoice.pdf"',
        "Content-Disposition: attachment; filename*=utf-8''r%C3%A9sum%C3%A9.pdf",
        'Content-Transfer-Encoding: base64',
        '',
        b64('%PDF-1.4 not really'),
        '--outer',
        'Content-Type: image/png',
        'Content-Transfer-Encoding: base64',
        '',
        'iVBORw0KGgo=',
        '--outer',
        'Content-Type: text/plain; name="log.txt"',
        '',
        'an attached log file',
        '--outer',
        'Content-Type: message/rfc822',
        '',
        'Subject: =?UTF-8?Q?Earlier_mail?=',
        '',
        'old text',
        '--outer--',
        '',
      ]),
    );
    expect(m.subject).toBe('Invoice');
    expect(m.text).toBe('Please find the invoice attached.\nTotal: 42 €');
    expect(m.source).toBe('plain');
    expect(m.attachments).toEqual(['résumé.pdf', '(unnamed image/png)', 'log.txt', '(attached message: Earlier mail)']);
  });

  it('reduces HTML to text when there is no plain part; skips signatures; decodes each part in its charset', () => {
    const m = readMail(
      crlf([
        'Subject: Only HTML',
        'Content-Type: multipart/signed; boundary=s; protocol="application/pgp-signature"',
        '',
        '--s',
        'Content-Type: multipart/alternative; boundary=a',
        '',
        '--a',
        'Content-Type: text/html; charset=windows-1251',
        'Content-Transfer-Encoding: base64',
        '',
        iconv.encode('<html><head><style>p{}</style></head><body><p>Заказ</p><p>не пришёл</p></body></html>', 'windows-1251').toString('base64'),
        '--a--',
        '--s',
        'Content-Type: application/pgp-signature',
        '',
        '-----BEGIN PGP SIGNATURE-----',
        '--s--',
      ]),
    );
    expect(m.text).toBe('Заказ\nне пришёл');
    expect(m).toMatchObject({ source: 'html', attachments: [], encodings: ['windows-1251'] });
  });

  it('guesses the charset when it is missing or unknown, and says so for an unknown one', () => {
    const latin = iconv.encode('Grüße aus Köln, die Lieferung ist überfällig.', 'windows-1252');
    const missing = readMail(Buffer.concat([Buffer.from('Subject: x\r\nFrom: a@b\r\n\r\n'), latin]));
    expect(missing.text).toBe('Grüße aus Köln, die Lieferung ist überfällig.');
    expect(missing.encodings).toEqual(['windows-1252']);
    expect(missing.warnings).toEqual([]);
    const unknown = readMail(Buffer.concat([Buffer.from('Subject: x\r\nContent-Type: text/plain; charset=x-martian\r\n\r\n'), latin]));
    expect(unknown.text).toBe('Grüße aus Köln, die Lieferung ist überfällig.');
    expect(unknown.warnings).toEqual(['unknown charset "x-martian"; the encoding was guessed']);
    // Declared Latin-1 but valid UTF-8 (a common mistake): the bytes win.
    const wrong = readMail(Buffer.from('Subject: x\r\nContent-Type: text/plain; charset=iso-8859-1\r\n\r\nGrüße', 'utf8'));
    expect(wrong.text).toBe('Grüße');
  });

  it('copes with an mbox From line, LF line ends, a missing boundary and an attachment-only message', () => {
    const m = readMail(Buffer.from('From someone@example.org Mon Sep  9 14:36:52 2002\nSubject: Unix\n  folded\n\nbody line\n'));
    expect(m.subject).toBe('Unix folded');
    expect(m.text).toBe('body line');
    const nb = readMail(Buffer.from('Subject: b\nContent-Type: multipart/mixed\n\njust text\n'));
    expect(nb.text).toBe('just text');
    expect(nb.warnings).toEqual(['a multipart/mixed has no boundary; its body was read as plain text']);
    const att = readMail(crlf(['Subject: scan', 'Content-Type: application/pdf; name=scan.pdf', 'Content-Transfer-Encoding: base64', '', 'JVBERi0=']));
    expect(att).toMatchObject({ text: '', source: 'none', attachments: ['scan.pdf'] });
  });

  it('tells an e-mail header block from other text', () => {
    expect(looksLikeMail(Buffer.from('From: a@b.c\r\nSubject: hi\r\n\r\nbody'), true)).toBe(true);
    expect(looksLikeMail(Buffer.from('Received: from x\r\n\tby y\r\nX-Thing: 1\r\n\r\n'), true)).toBe(true);
    expect(looksLikeMail(Buffer.from('Note: one field only\n\ntext'), true)).toBe(false);
    expect(looksLikeMail(Buffer.from('Title: a\nAuthor: b\n\ntext'), true)).toBe(false); // no mail field
    expect(looksLikeMail(Buffer.from('From: a\nSubject: b\nthen prose without a blank line'), true)).toBe(false);
  });
});

describe('e-mail through ingest', () => {
  it('reads .eml files and mail without extension, lists attachments and non-UTF-8 parts', async () => {
    const cwd = mkdtempSync(path.join(os.tmpdir(), 'sheaf-ingest-mail-'));
    put(
      cwd,
      'inbox/a.eml',
      crlf([
        'From: x@example.org',
        'Subject: =?ISO-8859-1?Q?Caf=E9_order?=',
        'Content-Type: multipart/mixed; boundary=b',
        '',
        '--b',
        'Content-Type: text/plain; charset=iso-8859-1',
        'Content-Transfer-Encoding: 8bit',
        '',
        'Deux caf\xe9s, merci.',
        '--b',
        'Content-Type: image/jpeg; name=menu.jpg',
        '',
        'xx',
        '--b--',
      ]),
    );
    put(cwd, 'inbox/only-attachment.eml', crlf(['Subject: s', 'Content-Type: application/zip; name=a.zip', '', 'PK']));
    put(cwd, 'inbox/not-mail.eml', 'just a line of text, no header at all');
    put(cwd, 'maildir/1700000000.M1P2.host', 'Return-Path: <y@example.org>\nFrom: y@example.org\nSubject: Leak\n\nThe roof leaks.\n');
    const r = await ingest(['inbox', 'maildir'], { include: ['**/*'] }, { cwd });
    expect(r.docs.map((d) => [d.id, d.title, d.text])).toEqual([
      ['a.eml', 'Café order', 'Deux cafés, merci.'],
      ['not-mail.eml', 'just a line of text, no header at all', 'just a line of text, no header at all'],
      ['1700000000.M1P2.host', 'Leak', 'The roof leaks.'],
    ]);
    expect(r.skipped).toEqual([{ source: 'inbox/only-attachment.eml', reason: 'no text: the e-mail has only attachments (1)' }]);
    expect(r.attachments).toEqual([{ source: 'inbox/a.eml', names: ['menu.jpg'] }]);
    expect(r.decoding).toEqual([{ source: 'inbox/a.eml', encoding: 'windows-1252', basis: 'mime', replaced: 0 }]);
    expect(r.warnings).toEqual([
      'inbox/a.eml: 1 attachment(s) not read: menu.jpg',
      'inbox/not-mail.eml: no e-mail header block; read as the body of a message',
      'maildir/1700000000.M1P2.host: extension ".host" is not one sheaf knows; read as an e-mail by its content',
    ]);
  });
});
