/**
 * WOFF 1.0 → TrueType/OpenType (sfnt) conversion, once per process, in memory.
 *
 * Why: fontkit reads a WOFF font by inflating the table it needs on every access and keeps nothing, so each
 * document's font subsetting inflated Inter's glyph tables again (about a fifth of a prep sheet's render time).
 * The sfnt holds the same tables uncompressed: same glyphs, metrics and layout, nothing inflated per document.
 *
 * Format (W3C "WOFF File Format 1.0", §3–§5): a 44-byte header (signature 'wOFF', flavor, numTables, …), then one
 * 20-byte directory entry per table (tag, offset, compLength, origLength, origChecksum); a table is zlib-compressed
 * when compLength < origLength. The sfnt (OpenType spec, "Organization of an OpenType font"): a 12-byte offset
 * table (sfntVersion = the WOFF flavor, numTables, searchRange, entrySelector, rangeShift), 16-byte table
 * records (tag, checksum, offset, length) in tag order, and the tables each padded to 4 bytes.
 */
import { inflateSync } from 'node:zlib';

const WOFF_SIGNATURE = 0x774f4646; // 'wOFF'

export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.length < 44 || woff.readUInt32BE(0) !== WOFF_SIGNATURE) throw new Error('not a WOFF 1.0 font');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables: Array<{ tag: number; checksum: number; data: Buffer }> = [];
  for (let i = 0; i < numTables; i++) {
    const at = 44 + i * 20;
    const tag = woff.readUInt32BE(at);
    const offset = woff.readUInt32BE(at + 4);
    const compLength = woff.readUInt32BE(at + 8);
    const origLength = woff.readUInt32BE(at + 12);
    const checksum = woff.readUInt32BE(at + 16);
    const stored = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(stored) : Buffer.from(stored);
    if (data.length !== origLength) throw new Error('WOFF table length mismatch');
    tables.push({ tag, checksum, data });
  }
  tables.sort((a, b) => a.tag - b.tag);
  const entrySelector = Math.floor(Math.log2(numTables));
  const searchRange = 2 ** entrySelector * 16;
  const headerLength = 12 + 16 * numTables;
  const pad = (n: number) => (n + 3) & ~3;
  const out = Buffer.alloc(headerLength + tables.reduce((sum, t) => sum + pad(t.data.length), 0));
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(searchRange, 6);
  out.writeUInt16BE(entrySelector, 8);
  out.writeUInt16BE(numTables * 16 - searchRange, 10);
  let offset = headerLength;
  tables.forEach((t, i) => {
    const at = 12 + i * 16;
    out.writeUInt32BE(t.tag, at);
    out.writeUInt32BE(t.checksum, at + 4);
    out.writeUInt32BE(offset, at + 8);
    out.writeUInt32BE(t.data.length, at + 12);
    t.data.copy(out, offset);
    offset += pad(t.data.length);
  });
  return out;
}
