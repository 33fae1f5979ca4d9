/**
 * Just enough of the ZIP format (PKWARE APPNOTE.TXT, §4.3: local file
 * headers, central directory, end of central directory record; from memory)
 * to list an archive's entries and read a small one: enough to recognise a
 * Word document, check its sizes before it is unpacked, and read its core
 * properties. ZIP64 archives are listed as far as their classic records go.
 *
 * @module
 */
import { inflateRawSync } from 'node:zlib';

/** One entry of the central directory. */
export interface ZipEntry {
  /** The name as stored (forward slashes; read as UTF-8). */
  readonly name: string;
  /** 0 stored, 8 deflated; others are not read. */
  readonly method: number;
  readonly compressedSize: number;
  /** Uncompressed size, as the archive declares it. */
  readonly size: number;
  /** Offset of the entry's local header. */
  readonly localOffset: number;
  /** Bit 0 of the general purpose flags: the entry is encrypted. */
  readonly encrypted: boolean;
}

const EOCD = 0x06054b50;
const CENTRAL = 0x02014b50;
const LOCAL = 0x04034b50;

/** True when `b` starts like a ZIP archive (a local file header, or the end record of an empty archive). */
export function looksLikeZip(b: Uint8Array): boolean {
  return b.length >= 4 && b[0] === 0x50 && b[1] === 0x4b && ((b[2] === 3 && b[3] === 4) || (b[2] === 5 && b[3] === 6));
}

/**
 * The entries of a ZIP archive, in central directory order. Throws an
 * `Error` with a short message when there is no end of central directory
 * record or the directory runs past the data.
 */
export function zipEntries(buf: Buffer): ZipEntry[] {
  const minStart = Math.max(0, buf.length - 22 - 0xffff);
  let eocd = -1;
  for (let i = buf.length - 22; i >= minStart; i--) {
    if (buf.readUInt32LE(i) === EOCD) {
      eocd = i;
      break;
    }
  }
  if (eocd === -1) throw new Error('no end of central directory record');
  const count = buf.readUInt16LE(eocd + 10);
  const cdOffset = buf.readUInt32LE(eocd + 16);
  const entries: ZipEntry[] = [];
  let p = cdOffset;
  for (let n = 0; n < count; n++) {
    if (p + 46 > buf.length || buf.readUInt32LE(p) !== CENTRAL) throw new Error('central directory is cut short or damaged');
    const flags = buf.readUInt16LE(p + 8);
    const method = buf.readUInt16LE(p + 10);
    const compressedSize = buf.readUInt32LE(p + 20);
    const size = buf.readUInt32LE(p + 24);
    const nameLen = buf.readUInt16LE(p + 28);
    const extraLen = buf.readUInt16LE(p + 30);
    const commentLen = buf.readUInt16LE(p + 32);
    const localOffset = buf.readUInt32LE(p + 42);
    if (p + 46 + nameLen > buf.length) throw new Error('central directory is cut short or damaged');
    const name = buf.toString('utf8', p + 46, p + 46 + nameLen);
    entries.push({ name, method, compressedSize, size, localOffset, encrypted: (flags & 1) === 1 });
    p += 46 + nameLen + extraLen + commentLen;
  }
  return entries;
}

/**
 * The uncompressed bytes of `entry` (stored or deflated), at most
 * `maxBytes` of them. Throws an `Error` for other methods, encryption,
 * damaged data or a larger entry.
 */
export function zipRead(buf: Buffer, entry: ZipEntry, maxBytes: number): Buffer {
  if (entry.encrypted) throw new Error(`${entry.name} is encrypted`);
  const p = entry.localOffset;
  if (p + 30 > buf.length || buf.readUInt32LE(p) !== LOCAL) throw new Error(`${entry.name}: local header missing`);
  const start = p + 30 + buf.readUInt16LE(p + 26) + buf.readUInt16LE(p + 28);
  const data = buf.subarray(start, start + entry.compressedSize);
  if (data.length < entry.compressedSize) throw new Error(`${entry.name}: data cut short`);
  if (entry.method === 0) {
    if (data.length > maxBytes) throw new Error(`${entry.name} is larger than ${maxBytes} bytes`);
    return data;
  }
  if (entry.method === 8) return inflateRawSync(data, { maxOutputLength: maxBytes });
  throw new Error(`${entry.name}: compression method ${entry.method} is not supported`);
}
