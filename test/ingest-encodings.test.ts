import { describe, expect, it } from 'vitest';
import path from 'node:path';
import iconv from 'iconv-lite';
import { ingest } from '../src/ingest/index.js';
import { canonicalEncoding, chooseEncoding, declaredHtmlCharset, utf16ByNulPattern } from '../src/ingest/charset.js';
import { decodeBuffer, InputDecoder } from '../src/ingest/decode.js';
import { tmp, put } from './helpers/files.js';

describe('Windows-1252', () => {
  it('decodes 0x80–0x9F as the published code chart; the five undefined bytes become U+FFFD, counted', () => {
    // The Windows-1252 chart for 0x80–0x9F (from memory): 0x81, 0x8D, 0x8F, 0x90 and 0x9D are undefined.
    // WHATWG's index maps those five to the C1 controls U+0081…; sheaf (through iconv-lite) decodes them as
    // U+FFFD and counts them as replaced, since no character was meant.
    const chart: [number, string][] = [
      [0x80, '\u20ac'], [0x81, '\ufffd'], [0x82, '\u201a'], [0x83, '\u0192'], [0x84, '\u201e'], [0x85, '\u2026'],
      [0x86, '\u2020'], [0x87, '\u2021'], [0x88, '\u02c6'], [0x89, '\u2030'], [0x8a, '\u0160'], [0x8b, '\u2039'],
      [0x8c, '\u0152'], [0x8d, '\ufffd'], [0x8e, '\u017d'], [0x8f, '\ufffd'], [0x90, '\ufffd'], [0x91, '\u2018'],
      [0x92, '\u2019'], [0x93, '\u201c'], [0x94, '\u201d'], [0x95, '\u2022'], [0x96, '\u2013'], [0x97, '\u2014'],
      [0x98, '\u02dc'], [0x99, '\u2122'], [0x9a, '\u0161'], [0x9b, '\u203a'], [0x9c, '\u0153'], [0x9d, '\ufffd'],
      [0x9e, '\u017e'], [0x9f, '\u0178'],
    ];
    expect(chart.map(([b]) => b)).toEqual(Array.from({ length: 32 }, (_, i) => 0x80 + i));
    const bytes = Buffer.from(chart.map(([b]) => b));
    const r = decodeBuffer(bytes, { forced: 'windows-1252' });
    expect(r.text).toBe(chart.map(([, c]) => c).join(''));
    expect(r.stats).toMatchObject({ encoding: 'windows-1252', basis: 'option', invalid: 5 });
    // The same through the ISO-8859-1 label, read as Windows-1252 (WHATWG Encoding Standard).
    expect(decodeBuffer(bytes, { forced: canonicalEncoding('ISO-8859-1') }).text).toBe(r.text);
  });

  it('detects Windows-1252 from typographic quotes, dashes and the euro sign', () => {
    const src = '\u201cHello\u201d \u2013 it costs 10 \u20ac, isn\u2019t that fine\u2026';
    const r = decodeBuffer(iconv.encode(src, 'windows-1252'));
    expect(r.text).toBe(src);
    expect(r.stats).toMatchObject({ encoding: 'windows-1252', basis: 'detected', invalid: 0 });
  });
});

describe('UTF-16', () => {
  const sample = 'Grüße aus Köln; 東京 and plain ASCII words around them.';

  it('reads both byte orders with a byte order mark', () => {
    const le = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(sample, 'utf16le')]);
    const be = Buffer.concat([Buffer.from([0xfe, 0xff]), Buffer.from(sample, 'utf16le').swap16()]);
    expect(decodeBuffer(le).text).toBe(sample);
    expect(decodeBuffer(le).stats).toMatchObject({ encoding: 'utf-16le', basis: 'bom', invalid: 0 });
    expect(decodeBuffer(be).text).toBe(sample);
    expect(decodeBuffer(be).stats).toMatchObject({ encoding: 'utf-16be', basis: 'bom', invalid: 0 });
  });

  it('recognises both byte orders without a byte order mark by the NUL pattern', () => {
    const le = Buffer.from(sample, 'utf16le');
    const be = Buffer.from(sample, 'utf16le').swap16();
    expect(utf16ByNulPattern(le)).toBe('utf-16le');
    expect(utf16ByNulPattern(be)).toBe('utf-16be');
    expect(decodeBuffer(le).text).toBe(sample);
    expect(decodeBuffer(le).stats).toMatchObject({ encoding: 'utf-16le', basis: 'nul-pattern' });
    expect(decodeBuffer(be).text).toBe(sample);
    expect(decodeBuffer(be).stats).toMatchObject({ encoding: 'utf-16be', basis: 'nul-pattern' });
    // Not UTF-16: NULs everywhere, or nowhere.
    expect(utf16ByNulPattern(Buffer.alloc(64))).toBeNull();
    expect(utf16ByNulPattern(Buffer.from('plain ASCII text'))).toBeNull();
  });

  it('counts an unpaired surrogate as replaced, a genuine U+FFFD not', () => {
    // "a", a lone high surrogate D800, "b", a genuine U+FFFD, in UTF-16LE with BOM.
    const bytes = Buffer.from([0xff, 0xfe, 0x61, 0x00, 0x00, 0xd8, 0x62, 0x00, 0xfd, 0xff]);
    const r = decodeBuffer(bytes);
    expect(r.text).toBe('a\ufffdb\ufffd');
    expect(r.stats.invalid).toBe(1);
  });

  it('finds the same NUL pattern however a stream is cut', () => {
    const bytes = Buffer.from(sample.repeat(300), 'utf16le');
    const d = new InputDecoder();
    let text = '';
    for (let i = 0; i < bytes.length; i += 777) text += d.push(bytes.subarray(i, i + 777));
    text += d.end();
    expect(text).toBe(sample.repeat(300));
    expect(d.stats()).toMatchObject({ encoding: 'utf-16le', basis: 'nul-pattern', invalid: 0 });
  });
});

describe('legacy single-byte encodings, detected', () => {
  // Each sentence is encoded here in the encoding named beside it; detection must give it back exactly.
  const cases: [string, string, string][] = [
    ['fr', 'windows-1252', 'Crème brûlée à la carte, servie chaude. Ça coûte très cher.'],
    ['fr', 'windows-1252', 'Bonjour, la facture reçue hier est erronée. Merci de vérifier.'],
    ['es', 'windows-1252', 'El envío llegó dañado; la caja estaba mojada. ¿Pueden reembolsar?'],
    ['de', 'windows-1252', 'Die Lieferung ist überfällig. Bitte prüfen Sie den Status. Grüße'],
    ['pt', 'windows-1252', 'A encomenda não chegou. Já paguei a fatura, obrigado pela atenção.'],
    ['it', 'windows-1252', 'La consegna è in ritardo, perché il corriere non è passato. Più info?'],
    ['nl', 'windows-1252', 'Het pakket is beschadigd aangekomen, ik wil graag een vergoeding. Ruïne.'],
    ['pl', 'iso-8859-2', 'Zażółć gęślą jaźń. Przesyłka nie dotarła, proszę o zwrot pieniędzy.'],
    ['cs', 'iso-8859-2', 'Příliš žluťoučký kůň úpěl ďábelské ódy. Zásilka nedorazila.'],
    ['hu', 'iso-8859-2', 'Árvíztűrő tükörfúrógép. A csomag nem érkezett meg, kérem a visszatérítést.'],
    ['ru', 'windows-1251', 'Заказ не пришёл, прошу вернуть деньги. Спасибо за помощь.'],
    ['ru', 'koi8-r', 'Привет, как дела? Это тест кодировки для русского текста.'],
    ['el', 'iso-8859-7', 'Η παραγγελία δεν έφτασε, παρακαλώ επιστροφή χρημάτων.'],
    ['tr', 'iso-8859-9', 'Siparişim gelmedi, lütfen paramı iade edin. Teşekkürler.'],
  ];
  for (const [lang, enc, text] of cases) {
    it(`${lang} in ${enc}: ${text.slice(0, 24)}…`, () => {
      const r = decodeBuffer(iconv.encode(text, enc));
      expect(r.text).toBe(text);
      expect(r.stats).toMatchObject({ encoding: enc, basis: 'detected', invalid: 0 });
    });
  }

  it('falls back to Windows-1252 when nothing else fits, and keeps damaged UTF-8 as UTF-8', () => {
    // One accented byte: too little for chardet to name a single-byte encoding.
    const short = decodeBuffer(Buffer.from('caf\xe9', 'latin1'));
    expect(short.text).toBe('café');
    expect(short.stats.encoding).toBe('windows-1252');
    // Mostly well-formed UTF-8 with one stray Latin-1 byte: UTF-8, one replacement.
    const damaged = decodeBuffer(Buffer.concat([Buffer.from('Grüße, naïve café — déjà vu '), Buffer.from([0xe9]), Buffer.from(' fin')]));
    expect(damaged.text).toBe('Grüße, naïve café — déjà vu \ufffd fin');
    expect(damaged.stats).toMatchObject({ encoding: 'utf-8', basis: 'utf-8', invalid: 1 });
  });
});

describe('forced and declared encodings', () => {
  const pl = 'Zażółć gęślą jaźń';

  it('a forced encoding wins over detection, a byte order mark over both', () => {
    const bytes = iconv.encode(pl, 'iso-8859-2');
    expect(decodeBuffer(bytes, { forced: 'iso-8859-2' }).text).toBe(pl);
    expect(decodeBuffer(bytes, { forced: 'windows-1252' }).text).toBe(iconv.decode(bytes, 'windows-1252'));
    const bom = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(pl)]);
    expect(chooseEncoding(bom, { forced: 'iso-8859-2', complete: true })).toEqual({ encoding: 'utf-8', basis: 'bom' });
    expect(decodeBuffer(bom, { forced: 'iso-8859-2' }).text).toBe(pl);
  });

  it('reads <meta charset> and http-equiv declarations in the first 1024 bytes', () => {
    expect(declaredHtmlCharset(Buffer.from('<!doctype html><html><head><meta charset="windows-1251">'))).toBe('windows-1251');
    expect(declaredHtmlCharset(Buffer.from('<meta http-equiv="Content-Type" content="text/html; charset=ISO-8859-2">'))).toBe('iso-8859-2');
    expect(declaredHtmlCharset(Buffer.from("<?xml version='1.0' encoding='koi8-r'?><html>"))).toBe('koi8-r');
    expect(declaredHtmlCharset(Buffer.from('<meta charset=latin1>'))).toBe('windows-1252');
    // WHATWG prescan: a UTF-16 declaration read from ASCII-compatible bytes means UTF-8.
    expect(declaredHtmlCharset(Buffer.from('<meta charset="utf-16">'))).toBe('utf-8');
    expect(declaredHtmlCharset(Buffer.from('<meta charset="no-such-thing">'))).toBeNull();
    expect(declaredHtmlCharset(Buffer.from(' '.repeat(1100) + '<meta charset="koi8-r">'))).toBeNull();
  });

  it('honours an HTML declaration through ingest, unless the bytes are valid UTF-8 with non-ASCII text', async () => {
    const dir = tmp();
    const ru = 'Заказ не пришёл';
    put(dir, 'ru.html', Buffer.concat([Buffer.from('<html><head><meta charset="windows-1251"><title>t</title></head><body><p>'), iconv.encode(ru, 'windows-1251'), Buffer.from('</p></body></html>')]));
    // Declared Latin-1, saved as UTF-8: the bytes win.
    put(dir, 'mislabelled.html', Buffer.from('<html><head><meta charset="iso-8859-1"></head><body><p>Grüße aus Köln</p></body></html>'));
    const r = await ingest(['ru.html', 'mislabelled.html'], {}, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual([ru, 'Grüße aus Köln']);
    expect(r.decoding).toEqual([
      { source: 'ru.html', encoding: 'windows-1251', basis: 'declared', replaced: 0 },
      { source: 'mislabelled.html', encoding: 'utf-8', basis: 'utf-8', replaced: 0, ignoredDeclaration: 'windows-1252' },
    ]);
  });
});

describe('a folder of mixed encodings', () => {
  it('decodes each file in its own encoding and lists every file that was not clean UTF-8', async () => {
    const cwd = tmp();
    const f = path.join(cwd, 'mixed');
    const de = 'Grüße aus Köln, die Lieferung ist überfällig.';
    const hu = 'Árvíztűrő tükörfúrógép, a csomag nem érkezett meg.';
    const ru = 'Привет, как дела? Это тест кодировки.';
    put(f, 'a-utf8.txt', de);
    put(f, 'b-utf8-bom.txt', Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(de)]));
    put(f, 'c-utf16le-bom.txt', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(de, 'utf16le')]));
    put(f, 'd-utf16be.txt', Buffer.from(de, 'utf16le').swap16());
    put(f, 'e-cp1252.txt', iconv.encode(de, 'windows-1252'));
    put(f, 'f-latin2.md', iconv.encode(hu, 'iso-8859-2'));
    put(f, 'g-koi8.txt', iconv.encode(ru, 'koi8-r'));
    put(f, 'h-damaged.txt', Buffer.concat([Buffer.from(de), Buffer.from([0xff])]));
    const r = await ingest(['mixed'], {}, { cwd });
    expect(r.docs.map((d) => [d.id, d.text])).toEqual([
      ['a-utf8.txt', de],
      ['b-utf8-bom.txt', de],
      ['c-utf16le-bom.txt', de],
      ['d-utf16be.txt', de],
      ['e-cp1252.txt', de],
      ['f-latin2.md', hu],
      ['g-koi8.txt', ru],
      ['h-damaged.txt', de + '\ufffd'],
    ]);
    expect(r.decoding).toEqual([
      { source: 'mixed/c-utf16le-bom.txt', encoding: 'utf-16le', basis: 'bom', replaced: 0 },
      { source: 'mixed/d-utf16be.txt', encoding: 'utf-16be', basis: 'nul-pattern', replaced: 0 },
      { source: 'mixed/e-cp1252.txt', encoding: 'windows-1252', basis: 'detected', replaced: 0 },
      { source: 'mixed/f-latin2.md', encoding: 'iso-8859-2', basis: 'detected', replaced: 0 },
      { source: 'mixed/g-koi8.txt', encoding: 'koi8-r', basis: 'detected', replaced: 0 },
      { source: 'mixed/h-damaged.txt', encoding: 'utf-8', basis: 'utf-8', replaced: 1 },
    ]);
    expect(r.warnings).toEqual(['mixed/h-damaged.txt: 1 invalid UTF-8 sequence(s) replaced with U+FFFD']);
    // Forcing one encoding for the folder: the byte order marks still win, the rest follow the option.
    const forced = await ingest(['mixed'], { encoding: 'iso-8859-2' }, { cwd });
    const byId = new Map(forced.docs.map((d) => [d.id, d.text]));
    expect(byId.get('f-latin2.md')).toBe(hu);
    expect(byId.get('c-utf16le-bom.txt')).toBe(de);
    expect(byId.get('e-cp1252.txt')).toBe(iconv.decode(iconv.encode(de, 'windows-1252'), 'iso-8859-2'));
  });

  it('streams a Windows-1252 CSV export, detected or forced', async () => {
    const dir = tmp();
    const csv = 'id,body\r\n1,Caf\u00e9 cr\u00e8me \u2013 \u201cnice\u201d\r\n2,10 \u20ac only\r\n';
    put(dir, 'w.csv', iconv.encode(csv, 'windows-1252'));
    const r = await ingest(['w.csv'], { id: 'id' }, { cwd: dir });
    expect(r.docs.map((d) => d.text)).toEqual(['Caf\u00e9 cr\u00e8me \u2013 \u201cnice\u201d', '10 \u20ac only']);
    expect(r.decoding).toEqual([{ source: 'w.csv', encoding: 'windows-1252', basis: 'detected', replaced: 0 }]);
    const f = await ingest(['w.csv'], { id: 'id', encoding: 'cp1252' }, { cwd: dir });
    expect(f.docs.map((d) => d.text)).toEqual(r.docs.map((d) => d.text));
    expect(f.decoding).toEqual([{ source: 'w.csv', encoding: 'windows-1252', basis: 'option', replaced: 0 }]);
  });
});
