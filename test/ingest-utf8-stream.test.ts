import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TextDecoder } from 'node:util';
import { utf8CompleteEnd, utf8Decoder } from '../src/ingest/decode.js';

/** The reference: Node's TextDecoder (WHATWG Encoding Standard) in stream mode over the same cuts. */
function reference(chunks: readonly Uint8Array[]): string {
  const d = new TextDecoder('utf-8');
  return chunks.map((c) => d.decode(c, { stream: true })).join('') + d.decode();
}

function fast(chunks: readonly Uint8Array[]): string {
  const d = utf8Decoder();
  return chunks.map((c) => d.write(Buffer.from(c.buffer, c.byteOffset, c.byteLength))).join('') + d.end();
}

/** Bytes biased towards UTF-8's interesting values: lead bytes, continuation bytes, ASCII, the BOM's bytes. */
const byteArb = fc.oneof(
  fc.integer({ min: 0, max: 255 }),
  fc.constantFrom(0xef, 0xbb, 0xbf, 0xc2, 0xc3, 0xe0, 0xe2, 0xed, 0xf0, 0xf4, 0xf5, 0xff, 0x80, 0x9f, 0xa0, 0x41),
  fc.integer({ min: 0x80, max: 0xbf }),
);
/** Valid text (any code points, with a BOM sometimes), as bytes, with stray bytes spliced in. */
const bytesArb = fc.oneof(
  fc.array(byteArb, { maxLength: 60 }).map((a) => Uint8Array.from(a)),
  fc
    .tuple(fc.boolean(), fc.string({ unit: 'binary', maxLength: 30 }), fc.array(byteArb, { maxLength: 4 }), fc.nat(40))
    .map(([bom, s, stray, at]) => {
      const b = Buffer.from((bom ? '\uFEFF' : '') + s, 'utf8');
      const pos = Math.min(at, b.length);
      return Uint8Array.from([...b.subarray(0, pos), ...stray, ...b.subarray(pos)]);
    }),
);
const cutArb = (bytes: Uint8Array) => fc.array(fc.integer({ min: 0, max: bytes.length }), { maxLength: 6 }).map((cuts) => {
  const at = [0, ...cuts.sort((a, b) => a - b), bytes.length];
  const chunks: Uint8Array[] = [];
  for (let i = 0; i + 1 < at.length; i++) chunks.push(bytes.subarray(at[i]!, at[i + 1]!));
  return chunks;
});

describe('streaming UTF-8 decoding (the fast path) against TextDecoder', () => {
  it('gives the text TextDecoder gives, for any bytes and any cuts', () => {
    fc.assert(
      fc.property(bytesArb.chain((b) => cutArb(b)), (chunks) => {
        expect(fast(chunks)).toBe(reference(chunks));
      }),
      { numRuns: 3000 },
    );
  });

  it('cases at the seams: a character cut in two or three, a BOM cut in two, a lead byte alone at the end', () => {
    const euro = Buffer.from('a€b', 'utf8'); // 61 E2 82 AC 62
    expect(fast([euro.subarray(0, 2), euro.subarray(2, 3), euro.subarray(3)])).toBe('a€b');
    const bom = Buffer.from('\uFEFFx', 'utf8');
    expect(fast([bom.subarray(0, 2), bom.subarray(2)])).toBe('x');
    expect(fast([Uint8Array.of(0x61, 0xf0, 0x9f)])).toBe('a\uFFFD');
    expect(reference([Uint8Array.of(0x61, 0xf0, 0x9f)])).toBe('a\uFFFD');
    expect(fast([Uint8Array.of(0xe0, 0x80), Uint8Array.of(0x41)])).toBe('\uFFFD\uFFFDA'); // E0 80: not a prefix of any character
    expect(fast([Uint8Array.of(0xef, 0xbb, 0xbf), Uint8Array.of(0xef, 0xbb, 0xbf, 0x41)])).toBe('\uFEFFA'); // only the first BOM goes
  });

  it('utf8CompleteEnd stops before an unfinished last character only', () => {
    expect(utf8CompleteEnd(Buffer.from('ab', 'utf8'))).toBe(2);
    expect(utf8CompleteEnd(Buffer.from('a€', 'utf8'))).toBe(4);
    expect(utf8CompleteEnd(Buffer.from('a€', 'utf8').subarray(0, 3))).toBe(1);
    expect(utf8CompleteEnd(Buffer.from('😀', 'utf8').subarray(0, 3))).toBe(0);
    expect(utf8CompleteEnd(Uint8Array.of(0x80, 0x80, 0x80, 0x80))).toBe(4);
    expect(utf8CompleteEnd(new Uint8Array(0))).toBe(0);
  });
});
