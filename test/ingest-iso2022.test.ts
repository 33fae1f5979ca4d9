/**
 * Encodings iconv-lite lacks, decoded by the platform's TextDecoder: ISO-2022-JP (RFC 1468). The bytes were made by
 * CPython's general-purpose iso2022_jp codec:
 *   python3 -c "print('会議室の予約が重複しています。\n'.encode('iso2022_jp').hex())"
 *   python3 -c "import base64; print(base64.b64encode('会議室の予約'.encode('iso2022_jp')).decode())"
 * They follow RFC 1468 §3: ESC $ B switches to JIS X 0208 (two 7-bit bytes a character), ESC ( B back to ASCII,
 * and a line ends in ASCII.
 */
import { describe, expect, it } from 'vitest';
import { ingest, resolveIngestOptions } from '../src/ingest/index.js';
import { decodeEncodedWords } from '../src/ingest/mail.js';
import { canonicalEncoding, looksLikeIso2022Jp } from '../src/ingest/charset.js';
import { put, tmp } from './helpers/files.js';

const LINE = Buffer.from('1b2442327135443c3c244e4d3d4c73242c3d454a23243724462424245e243921231b28420a', 'hex');
const SUBJECT = '=?ISO-2022-JP?B?GyRCMnE1RDw8JE5NPUxzGyhC?=';

describe('ISO-2022-JP (RFC 1468) through TextDecoder', () => {
  it('is a known encoding name; the WHATWG replacement labels are not', () => {
    expect(canonicalEncoding('ISO-2022-JP')).toBe('iso-2022-jp');
    expect(canonicalEncoding('csISO2022JP')).toBe('iso-2022-jp');
    expect(canonicalEncoding('iso-2022-kr')).toBe(null);
    expect(resolveIngestOptions({ encoding: ' ISO-2022-JP ' }).encoding).toBe('iso-2022-jp');
  });

  it('detects and decodes a text file written in it', async () => {
    expect(looksLikeIso2022Jp(LINE)).toBe(true);
    expect(looksLikeIso2022Jp(Buffer.from('plain ASCII, no escape\n'))).toBe(false);
    const dir = tmp();
    put(dir, 'memo.txt', Buffer.concat([LINE, LINE]));
    const r = await ingest(['memo.txt'], {}, { cwd: dir });
    expect(r.docs[0]?.text).toBe('会議室の予約が重複しています。\n会議室の予約が重複しています。');
    expect(r.decoding).toEqual([{ source: 'memo.txt', encoding: 'iso-2022-jp', basis: 'detected', replaced: 0 }]);
  });

  it('decodes it when forced, in an export too', async () => {
    const dir = tmp();
    put(dir, 'rows.csv', Buffer.concat([Buffer.from('id,body\n1,'), LINE]));
    const r = await ingest(['rows.csv'], { encoding: 'iso-2022-jp' }, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual(['会議室の予約が重複しています。']);
  });

  it('decodes mail subjects (RFC 2047 encoded words) and bodies declared in it', async () => {
    expect(decodeEncodedWords(`Re: ${SUBJECT}`)).toBe('Re: 会議室の予約');
    const dir = tmp();
    const mail = Buffer.concat([
      Buffer.from(`From: Ana <ana@example.org>\r\nSubject: ${SUBJECT}\r\nMIME-Version: 1.0\r\nContent-Type: text/plain; charset=ISO-2022-JP\r\nContent-Transfer-Encoding: 7bit\r\n\r\n`),
      LINE,
    ]);
    put(dir, 'note.eml', mail);
    const r = await ingest(['note.eml'], {}, { cwd: dir });
    expect(r.docs.map((d) => [d.title, d.text])).toEqual([['会議室の予約', '会議室の予約が重複しています。']]);
    expect(r.decoding).toEqual([{ source: 'note.eml', encoding: 'iso-2022-jp', basis: 'mime', replaced: 0 }]);
  });
});
