/**
 * Fonts for every PDF, registered once from files shipped in node_modules (no network at run time).
 * Inter .woff (Latin subset: has ± ° µ ³) for text; DejaVu Sans .ttf for subscripts, Greek letters and other
 * symbols the Latin subset lacks. Never .woff2: react-pdf embeds it but draws nothing (STACK P7).
 */
import { createRequire } from 'node:module';
import { Font } from '@react-pdf/renderer';

const require = createRequire(import.meta.url);

export const TEXT_FONT = 'Inter';
export const SYMBOL_FONT = 'DejaVu';

let registered = false;

export function registerFonts(): void {
  if (registered) return;
  Font.register({
    family: TEXT_FONT,
    fonts: [
      { src: require.resolve('@fontsource/inter/files/inter-latin-400-normal.woff'), fontWeight: 400 },
      { src: require.resolve('@fontsource/inter/files/inter-latin-700-normal.woff'), fontWeight: 700 },
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

/** Characters outside Inter's Latin subset (subscripts, superscripts other than ³, Greek, arrows, ≤ ≥ ×). */
const NEEDS_SYMBOL_FONT = /[^\u0000-\u00ff\u2013\u2014\u2018\u2019\u201c\u201d\u2022\u2026\u20ac]/;

/** The font family for a run of text: DejaVu when the text has a character Inter's Latin subset lacks. */
export function fontFor(text: string): string {
  return NEEDS_SYMBOL_FONT.test(text) ? SYMBOL_FONT : TEXT_FONT;
}

/**
 * OpenType features switched off for speed: Inter's contextual alternates and ligatures made text shaping
 * the slowest step of a label sheet (fontkit GSUB lookups). Only calt and liga: switching off ccmp/locl/mark/kern as
 * well made fontkit drop the full stop and the digit before it ("0.9995" printed as ".9995") in the prep sheet.
 */
export const PLAIN_SHAPING = { calt: false, liga: false } as const;
