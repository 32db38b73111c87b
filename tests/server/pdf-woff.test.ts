// The shipped Inter WOFF fonts are unpacked to sfnt once (server/pdf/woff.ts) so that fontkit does not inflate
// their tables for every document. The unpacked font must be the same font: same glyph count, units per em,
// character map, advance widths and shaped layout. Reference: the WOFF file itself read by fontkit (the library
// react-pdf uses), and the WOFF 1.0 specification's rule that a decoded table equals its origLength bytes.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { create } from 'fontkit';
import { describe, expect, it } from 'vitest';
import { woffToSfnt } from '../../server/pdf/woff.ts';

const require = createRequire(import.meta.url);
const FILES = ['@fontsource/inter/files/inter-latin-400-normal.woff', '@fontsource/inter/files/inter-latin-700-normal.woff'];

interface Font {
  numGlyphs: number;
  unitsPerEm: number;
  characterSet: number[];
  glyphForCodePoint(cp: number): { id: number; advanceWidth: number };
  layout(text: string): { glyphs: Array<{ id: number }>; positions: Array<{ xAdvance: number; xOffset: number }> };
}

describe('WOFF unpacked to sfnt', () => {
  it.each(FILES)('when %s is unpacked, then fontkit reads the same font from it', (file) => {
    const woffBytes = readFileSync(require.resolve(file));
    const sfnt = woffToSfnt(woffBytes);
    expect(sfnt.readUInt32BE(0)).toBe(woffBytes.readUInt32BE(4)); // the sfnt version is the WOFF flavor
    expect(sfnt.length).toBe(woffBytes.readUInt32BE(16)); // the WOFF header's totalSfntSize (4-byte padded tables)
    const woff = create(woffBytes) as unknown as Font;
    const ttf = create(sfnt) as unknown as Font;
    expect(ttf.numGlyphs).toBe(woff.numGlyphs);
    expect(ttf.unitsPerEm).toBe(woff.unitsPerEm);
    expect([...ttf.characterSet].sort()).toEqual([...woff.characterSet].sort());
    for (const cp of woff.characterSet) {
      const a = woff.glyphForCodePoint(cp);
      const b = ttf.glyphForCodePoint(cp);
      expect([b.id, b.advanceWidth]).toEqual([a.id, a.advanceWidth]);
    }
    const text = 'Pb 1003.806 ± 0.019 mg/L, 0.9995 g/g, 20.0 °C, µL: HWL-2026-0003 … Tollefsen’s';
    const [la, lb] = [woff.layout(text), ttf.layout(text)];
    expect(lb.glyphs.map((g) => g.id)).toEqual(la.glyphs.map((g) => g.id));
    expect(lb.positions.map((p) => [p.xAdvance, p.xOffset])).toEqual(la.positions.map((p) => [p.xAdvance, p.xOffset]));
  });

  it('when the input is not WOFF 1.0, then it is refused', () => {
    expect(() => woffToSfnt(Buffer.from('not a font at all, just some bytes long enough for a header..'))).toThrow(/WOFF/);
  });
});
