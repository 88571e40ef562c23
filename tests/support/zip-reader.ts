/**
 * A small zip reader for tests, written from the ZIP format's published description (PKWARE
 * APPNOTE.TXT, sections 4.3.7 local header, 4.3.12 central directory header, 4.3.16 end of
 * central directory record): the central directory gives each entry's name, method, sizes, CRC-32
 * and local header offset; the data follows the local header (its sizes may be 0 when a data
 * descriptor follows, so the central directory's are used). Stored (0) and deflated (8) entries.
 */
import zlib from 'node:zlib';

export type ZipEntry = { name: string; method: number; crc32: number; bytes: Buffer };

export function readZip(zip: Buffer): ZipEntry[] {
  // The end record is the last 22 bytes unless the archive has a comment.
  let end = -1;
  for (let k = zip.length - 22; k >= Math.max(0, zip.length - 22 - 0xffff); k--) {
    if (zip.readUInt32LE(k) === 0x06054b50) {
      end = k;
      break;
    }
  }
  if (end < 0) throw new Error('no end of central directory record');
  const count = zip.readUInt16LE(end + 10);
  let at = zip.readUInt32LE(end + 16);
  const out: ZipEntry[] = [];
  for (let n = 0; n < count; n++) {
    if (zip.readUInt32LE(at) !== 0x02014b50) throw new Error(`bad central directory header at ${at}`);
    const flags = zip.readUInt16LE(at + 8);
    const method = zip.readUInt16LE(at + 10);
    const crc32 = zip.readUInt32LE(at + 16);
    const compressed = zip.readUInt32LE(at + 20);
    const size = zip.readUInt32LE(at + 24);
    const nameLen = zip.readUInt16LE(at + 28);
    const extraLen = zip.readUInt16LE(at + 30);
    const commentLen = zip.readUInt16LE(at + 32);
    const local = zip.readUInt32LE(at + 42);
    // Bit 11: the name is UTF-8.
    const name = zip.subarray(at + 46, at + 46 + nameLen).toString(flags & 0x800 ? 'utf8' : 'latin1');
    if (zip.readUInt32LE(local) !== 0x04034b50) throw new Error(`bad local header for ${name}`);
    const dataAt = local + 30 + zip.readUInt16LE(local + 26) + zip.readUInt16LE(local + 28);
    const raw = zip.subarray(dataAt, dataAt + compressed);
    const bytes = method === 0 ? Buffer.from(raw) : method === 8 ? zlib.inflateRawSync(raw) : null;
    if (!bytes) throw new Error(`${name}: compression method ${method} not read here`);
    if (bytes.length !== size) throw new Error(`${name}: ${bytes.length} bytes, the directory says ${size}`);
    out.push({ name, method, crc32, bytes });
    at += 46 + nameLen + extraLen + commentLen;
  }
  return out;
}

/** CRC-32 (IEEE 802.3 polynomial 0xEDB88320, as the zip format uses), bit by bit: independent of zlib. */
export function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const b of bytes) {
    c ^= b;
    for (let k = 0; k < 8; k++) c = c & 1 ? (c >>> 1) ^ 0xedb88320 : c >>> 1;
  }
  return (c ^ 0xffffffff) >>> 0;
}
