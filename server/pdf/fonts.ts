/**
 * Fonts for every PDF, registered once from files shipped in node_modules (no network at run time).
 * Inter .woff (Latin subset: has ± ° µ ³) for text, unpacked once to sfnt in memory (woff.ts says why); DejaVu
 * Sans .ttf for subscripts, Greek letters and other symbols the Latin subset lacks. Never .woff2: react-pdf embeds
 * it but draws nothing (STACK P7).
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { Font } from '@react-pdf/renderer';
import { woffToSfnt } from './woff.ts';

const require = createRequire(import.meta.url);

export const TEXT_FONT = 'Inter';
export const SYMBOL_FONT = 'DejaVu';
const WEIGHTS = [400, 700] as const;

let registered = false;

/** A shipped WOFF font as a data URL of its sfnt (react-pdf loads data URLs with fontkit.create). */
function unpackedWoff(file: string): string {
  return `data:font/ttf;base64,${woffToSfnt(readFileSync(require.resolve(file))).toString('base64')}`;
}

export function registerFonts(): void {
  if (registered) return;
  Font.register({
    family: TEXT_FONT,
    fonts: [
      { src: unpackedWoff('@fontsource/inter/files/inter-latin-400-normal.woff'), fontWeight: 400 },
      { src: unpackedWoff('@fontsource/inter/files/inter-latin-700-normal.woff'), fontWeight: 700 },
    ],
  });
  Font.register({
    family: SYMBOL_FONT,
    fonts: [
      { src: require.resolve('dejavu-fonts-ttf/ttf/DejaVuSans.ttf'), fontWeight: 400 },
      { src: require.resolve('dejavu-fonts-ttf/ttf/DejaVuSans-Bold.ttf'), fontWeight: 700 },
    ],
  });
  // Words are never split with hyphens: identifiers and numbers must print whole.
  Font.registerHyphenationCallback((word) => [word]);
  registered = true;
}

/**
 * The part of a fontkit font object this module relies on. fontkit keeps one glyph object per glyph id for the
 * life of the font, with the code points it was first created with (`getGlyph(id, codePoints)` caches). The
 * font subsetter that embeds a finished document asks for the components of compound glyphs with no code
 * points: Inter draws ':' and '…' from the full stop, so a document with a time in it that finished embedding
 * before another document had laid out its first '.' left the full stop cached with no code points, for every
 * later document of the process. react-pdf's text layout maps glyphs back to characters by their code points,
 * so a glyph without them swallowed the character before it ("4.53" printed as ".53", "0.9995" as "9995") and
 * the text layer lost every '.'; which glyph was hit depended on the order in which concurrent renders finished.
 */
interface FontkitFont {
  characterSet: number[];
  glyphForCodePoint(codePoint: number): { codePoints: number[] } | null;
  getGlyph(id: number, codePoints?: number[]): { codePoints: number[] } | null;
  __tarebookGlyphsFixed?: true;
}

/**
 * Makes a loaded font's glyph cache independent of the order documents are laid out and embedded in:
 * 1. every glyph the font's character map reaches is created first from its own code point, so a glyph that is
 *    also a component of a compound glyph already knows its character when the subsetter asks for it; where one
 *    glyph serves several code points (space and no-break space, ’ and ʼ), the common one is taken, in the order
 *    ASCII, Latin-1, general punctuation, then the rest, so the text layer reads the same whatever was printed first;
 * 2. a glyph that was nevertheless created without code points (one reached only through a substitution and
 *    first met as a component) takes the code points of the first layout that uses it, instead of keeping none.
 */
function fixGlyphCodePoints(font: FontkitFont): void {
  if (font.__tarebookGlyphsFixed) return;
  const rank = (cp: number) => (cp >= 0x20 && cp <= 0x7e ? 0 : cp >= 0xa0 && cp <= 0xff ? 1 : cp >= 0x2000 && cp <= 0x206f ? 2 : 3);
  const codePoints = [...font.characterSet].sort((a, b) => rank(a) - rank(b) || a - b);
  for (const codePoint of codePoints) font.glyphForCodePoint(codePoint);
  const getGlyph = font.getGlyph.bind(font);
  font.getGlyph = (id: number, codePoints: number[] = []) => {
    const glyph = getGlyph(id, codePoints);
    if (glyph && glyph.codePoints.length === 0 && codePoints.length > 0) glyph.codePoints = [...codePoints];
    return glyph;
  };
  font.__tarebookGlyphsFixed = true;
}

let ready: Promise<void> | undefined;

/**
 * Registers, loads and prepares every PDF font once per process (see fixGlyphCodePoints). Every render awaits
 * this before it starts, so no document is ever laid out with a font in another state.
 */
export function fontsReady(): Promise<void> {
  ready ??= (async () => {
    registerFonts();
    for (const fontFamily of [TEXT_FONT, SYMBOL_FONT]) {
      for (const fontWeight of WEIGHTS) {
        await Font.load({ fontFamily, fontWeight });
        const source = Font.getFont({ fontFamily, fontWeight }) as unknown as { data: FontkitFont | null } | undefined;
        if (!source?.data) throw new Error(`PDF font ${fontFamily} ${fontWeight} did not load`);
        fixGlyphCodePoints(source.data);
      }
    }
  })().catch((err: unknown) => {
    ready = undefined;
    throw err;
  });
  return ready;
}

/** Characters outside Inter's Latin subset (subscripts, superscripts other than ³, Greek, arrows, ≤ ≥ ×). */
const NEEDS_SYMBOL_FONT = /[^\u0000-\u00ff\u2013\u2014\u2018\u2019\u201c\u201d\u2022\u2026\u20ac]/;

/** The font family for a run of text: DejaVu when the text has a character Inter's Latin subset lacks. */
export function fontFor(text: string): string {
  return NEEDS_SYMBOL_FONT.test(text) ? SYMBOL_FONT : TEXT_FONT;
}

/**
 * OpenType features switched off for speed: Inter's contextual alternates and ligatures made text shaping
 * the slowest step of a label sheet (fontkit GSUB lookups). Only calt and liga. (A full stop and the digit before it
 * once went missing, first blamed on switching off more features; the cause was the glyph cache, see
 * fixGlyphCodePoints.)
 */
export const PLAIN_SHAPING = { calt: false, liga: false } as const;
