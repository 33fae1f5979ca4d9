import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { DEFAULT_INGEST_OPTIONS, resolveIngestOptions, type IngestOptions } from '../src/ingest/index.js';
import { InputDecoder, decodeBuffer, InputSkip } from '../src/ingest/decode.js';
import { UsageError } from '../src/util/errors.js';

function fails(partial: Record<string, unknown>): UsageError {
  try {
    resolveIngestOptions(partial as Partial<IngestOptions>);
  } catch (err) {
    expect(err).toBeInstanceOf(UsageError);
    return err as UsageError;
  }
  throw new Error('expected a UsageError');
}

describe('resolveIngestOptions', () => {
  it('fills the defaults', () => {
    expect(resolveIngestOptions()).toEqual({
      text: null,
      id: null,
      title: null,
      include: ['**/*.{txt,md,markdown,html,htm,pdf,docx,eml,mbox}'],
      exclude: [],
      format: 'auto',
      delimiter: null,
      encoding: null,
      maxBytes: 5 * 1024 * 1024,
      maxFiles: null,
      maxStreamBytes: 4 * 1024 * 1024 * 1024,
      sheet: null,
    });
    expect(resolveIngestOptions({ text: undefined, format: undefined })).toEqual(DEFAULT_INGEST_OPTIONS);
  });

  it('takes a sheet name, trimmed, and refuses an empty one', () => {
    expect(resolveIngestOptions({ sheet: ' Notes ' }).sheet).toBe('Notes');
    expect(() => resolveIngestOptions({ sheet: ' ' })).toThrow('sheet must be a sheet name or null (the first sheet); got " "');
    expect(() => resolveIngestOptions({ sheet: 3 as unknown as string })).toThrow('sheet must be a sheet name or null (the first sheet); got 3');
  });

  it('trims names, reads tab spellings, strips ./ from patterns', () => {
    const o = resolveIngestOptions({ text: [' subject ', 'body'], id: ' ticket_id ', delimiter: '\\t', include: ['./docs/**/*.md'] });
    expect(o.text).toEqual(['subject', 'body']);
    expect(o.id).toBe('ticket_id');
    expect(o.delimiter).toBe('\t');
    expect(o.include).toEqual(['docs/**/*.md']);
    expect(resolveIngestOptions({ delimiter: 'tab' }).delimiter).toBe('\t');
    expect(resolveIngestOptions({ delimiter: ';' }).delimiter).toBe(';');
    // Encodings: canonical lower case; Latin-1 and ASCII labels mean Windows-1252 (WHATWG Encoding Standard).
    expect(resolveIngestOptions({ encoding: ' ISO-8859-2 ' }).encoding).toBe('iso-8859-2');
    expect(resolveIngestOptions({ encoding: 'latin1' }).encoding).toBe('windows-1252');
    expect(resolveIngestOptions({ encoding: 'UTF8' }).encoding).toBe('utf-8');
    expect(resolveIngestOptions({ encoding: 'utf-16' }).encoding).toBe('utf-16le');
    expect(resolveIngestOptions({ encoding: 'Shift_JIS' }).encoding).toBe('shift_jis');
    expect(resolveIngestOptions({ maxBytes: 1024, maxFiles: 3 })).toMatchObject({ maxBytes: 1024, maxFiles: 3 });
  });

  it('names the bad value and what is allowed', () => {
    const cases: [Record<string, unknown>, string, string][] = [
      [{ text: 'body' }, 'text must be a list of column names or null (to guess); got "body"', 'text'],
      [{ text: [] }, 'text must name at least one column (or be null to guess); got []', 'text'],
      [{ text: ['body', ' '] }, 'text must name columns with non-empty strings; got ["body"," "]', 'text'],
      [{ id: '' }, 'id must be a column name or null; got ""', 'id'],
      [{ title: 3 }, 'title must be a column name or null; got 3', 'title'],
      [{ include: [] }, 'include must list at least one glob pattern; got []', 'include'],
      [{ include: '**/*.md' }, 'include must be a list of glob patterns (non-empty strings); got "**/*.md"', 'include'],
      [{ exclude: [''] }, 'exclude must be a list of glob patterns (non-empty strings); got [""]', 'exclude'],
      [{ include: ['../up/*.md'] }, 'include patterns are relative to each folder and stay inside it; got "../up/*.md"', 'include'],
      [{ exclude: ['/abs/**'] }, 'exclude patterns are relative to each folder and stay inside it; got "/abs/**"', 'exclude'],
      [{ format: 'xml' }, 'format must be one of auto, csv, tsv, jsonl, json, text; got "xml"', 'format'],
      [
        { delimiter: ';;' },
        'delimiter must be one character other than a quote or a line break (or "\\t" for tab); got ";;"',
        'delimiter',
      ],
      [
        { delimiter: '"' },
        'delimiter must be one character other than a quote or a line break (or "\\t" for tab); got "\\""',
        'delimiter',
      ],
    ];
    const encodingMessage = (v: string): string =>
      `encoding must be a character encoding iconv-lite knows (such as utf-8, windows-1252, iso-8859-2, utf-16le) or null to detect it; got ${v}`;
    cases.push(
      [{ encoding: 'klingon-8' }, encodingMessage('"klingon-8"'), 'encoding'],
      [{ encoding: '' }, encodingMessage('""'), 'encoding'],
      [{ encoding: 1252 }, encodingMessage('1252'), 'encoding'],
      [{ maxBytes: 1023 }, 'maxBytes must be a whole number of bytes >= 1024; got 1023', 'maxBytes'],
      [{ maxBytes: 2.5e6 + 0.5 }, 'maxBytes must be a whole number of bytes >= 1024; got 2500000.5', 'maxBytes'],
      [{ maxBytes: '5MB' }, 'maxBytes must be a whole number of bytes >= 1024; got "5MB"', 'maxBytes'],
      [{ maxBytes: null }, 'maxBytes must be a whole number of bytes >= 1024; got null', 'maxBytes'],
      [{ maxFiles: 0 }, 'maxFiles must be a whole number >= 1, or null for no cap; got 0', 'maxFiles'],
      [{ maxFiles: Number.NaN }, 'maxFiles must be a whole number >= 1, or null for no cap; got NaN', 'maxFiles'],
      [{ maxStreamBytes: 1023 }, 'maxStreamBytes must be a whole number of bytes >= 1024; got 1023', 'maxStreamBytes'],
    );
    for (const [partial, message, option] of cases) {
      const e = fails(partial);
      expect(e.message).toBe(message);
      expect(e.option).toBe(option);
    }
  });
});

describe('decoding', () => {
  it('drops UTF-8 and UTF-16 byte order marks', () => {
    expect(decodeBuffer(Buffer.from('\uFEFFhé', 'utf8')).text).toBe('hé');
    const le = decodeBuffer(Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('hé\u0000x', 'utf16le')]));
    expect(le.text).toBe('hé\u0000x');
    expect(le.stats.encoding).toBe('utf-16le');
    const be = Buffer.from('hi', 'utf16le').swap16();
    expect(decodeBuffer(Buffer.concat([Buffer.from([0xfe, 0xff]), be])).text).toBe('hi');
  });

  it('counts replaced sequences, not genuine U+FFFD, and hashes the bytes (FIPS 180-2 B.1 for "abc")', () => {
    const r = decodeBuffer(Buffer.from('abc'));
    expect(r.stats.sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    // C3 28: a lead byte without its continuation (one error); EF BF BD: a real U+FFFD; FF: never UTF-8.
    // The well-formed é, ï and — outnumber the two errors, so this is damaged UTF-8, not a legacy encoding.
    const prose = 'plenty of ordinary text first — café, naïve. ';
    const bad = decodeBuffer(Buffer.concat([Buffer.from(prose), Buffer.from([0x61, 0xc3, 0x28, 0xef, 0xbf, 0xbd, 0xff])]));
    expect(bad.text).toBe(prose + 'a\ufffd(\ufffd\ufffd');
    expect(bad.stats).toMatchObject({ invalid: 2, encoding: 'utf-8', basis: 'utf-8' });
  });

  it('calls NUL-holding, control-laden or mostly-invalid input binary, and empty input empty', () => {
    expect(() => decodeBuffer(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00]))).toThrow(
      new InputSkip('binary: NUL bytes in the first 8 KiB'),
    );
    // 3 control characters in 20: 15%.
    expect(() => decodeBuffer(Buffer.from('ab\x01cdefg\x02hijklm\x7fnopq'))).toThrow(new InputSkip('binary: 15% control characters in the first 8 KiB'));
    // UTF-8 by majority (6 good é against 2 bad bytes) yet 2 of 8 characters bad: 25% is still text, 3 of 9 is not.
    expect(decodeBuffer(Buffer.from([0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xff, 0xff])).stats.invalid).toBe(2);
    expect(() => decodeBuffer(Buffer.from([0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xc3, 0xa9, 0xff, 0xff, 0xff]))).toThrow(
      new InputSkip('binary: 33% of the characters in the first 8 KiB are not valid UTF-8'),
    );
    expect(() => decodeBuffer(Buffer.alloc(0))).toThrow(new InputSkip('empty (0 bytes)'));
    // Latin-1 prose: not UTF-8 at all, so a legacy encoding, read without loss.
    const latin = decodeBuffer(Buffer.from('Crème brûlée à la carte, servie chaude.', 'latin1'));
    expect(latin.text).toBe('Crème brûlée à la carte, servie chaude.');
    expect(latin.stats).toMatchObject({ invalid: 0, encoding: 'windows-1252', basis: 'detected' });
  });

  it('streams to the same text, count and digest however the bytes are split', () => {
    const piece = fc.constantFrom(
      [0x61], [0x0a], [0xc3, 0xa9], [0xe2, 0x9c, 0x93], [0xf0, 0x9f, 0x98, 0x80], [0xef, 0xbf, 0xbd], [0xc3], [0xff], [0xe2, 0x9c], [0xbf],
    );
    fc.assert(
      fc.property(fc.array(piece, { minLength: 20, maxLength: 80, size: 'max' }), fc.array(fc.nat(300), { maxLength: 12 }), (pieces, cuts) => {
        // ASCII prose first, filling the 8 KiB a stream is judged by (so it is UTF-8), then the pieces:
        // the cuts fall where chunks are decoded one by one.
        const bytes = Buffer.concat([Buffer.from('x'.repeat(8192)), Buffer.from(pieces.flat())]);
        const one = new InputDecoder();
        const whole = { text: one.push(bytes) + one.end(), stats: one.stats() };
        expect(whole.stats.encoding).toBe('utf-8');
        const d = new InputDecoder();
        let text = '';
        let prev = 0;
        for (const c of [...new Set(cuts.map((x) => (8150 + x) % (bytes.length + 1)))].sort((a, b) => a - b)) {
          text += d.push(bytes.subarray(prev, c));
          prev = c;
        }
        text += d.push(bytes.subarray(prev)) + d.end();
        const s = d.stats();
        expect(text).toBe(whole.text);
        expect(s.invalid).toBe(whole.stats.invalid);
        expect(s.sha256).toBe(whole.stats.sha256);
        // Reference count: Node's own decoder replaces each invalid sequence by one U+FFFD.
        const ref = new TextDecoder().decode(bytes).split('\ufffd').length - 1 - (bytes.toString('latin1').split('\xef\xbf\xbd').length - 1);
        expect(s.invalid).toBe(ref);
      }),
      { numRuns: 400, seed: 8 },
    );
  });
});
