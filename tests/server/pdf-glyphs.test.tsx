// The PDF text of a document does not depend on what the process printed before it (server/pdf/fonts.ts).
// Reproduction of a printed-digits defect: a first document with a time in it ("13:42") and no full stop made the
// font subsetter cache Inter's full-stop glyph (a component of ':' and '…') without its character, and from then on
// every document of the process printed "4.53" as "4 53" in its text layer, dropped digits before the point where
// a run began, and broke lines inside numbers. Each vitest file runs in a fresh module state, so the first render
// here is the first of the process.
import { execFileSync } from 'node:child_process';
import { Document, Page, Text } from '@react-pdf/renderer';
import { PDFParse } from 'pdf-parse';
import { describe, expect, it } from 'vitest';
import { renderDocument } from '../../server/pdf/document.ts';
import { PLAIN_SHAPING, TEXT_FONT } from '../../server/pdf/fonts.ts';

const page = (lines: string[], weight = 400) => (
  <Document>
    <Page size="A5" style={{ fontFamily: TEXT_FONT, fontFeatureSettings: PLAIN_SHAPING, fontWeight: weight, padding: 24, fontSize: 10 }}>
      {lines.map((l) => (
        <Text key={l}>{l}</Text>
      ))}
    </Page>
  </Document>
);

async function texts(pdf: Buffer): Promise<string[]> {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  try {
    const parsed = (await parser.getText()).text;
    const drawn = execFileSync('pdftotext', ['-', '-'], { input: pdf }).toString();
    return [parsed, drawn].map((t) => t.replace(/\s+/g, ' '));
  } finally {
    await parser.destroy();
  }
}

const NUMBERS = ['Density 4.53 g/mL', '0.9995 ± 0.0004 (k = 2)', '8.0 g/mL', '2.501386', 'lab’s procedures', 'Dr. Maren Tollefsen'];

describe('PDF glyphs', () => {
  it('when the first documents hold only a time and an ellipsis, then later documents keep every digit, point and apostrophe', async () => {
    // rendered first, one after the other and then at the same time: none of them has a full stop of its own
    await renderDocument(page(['Printed 13:42']));
    await Promise.all([renderDocument(page(['Signed 09:12 …'])), renderDocument(page(['14:05'], 700)), renderDocument(page(['Due: 2027'], 700))]);
    const [regular, bold] = await Promise.all([renderDocument(page(NUMBERS)), renderDocument(page(NUMBERS, 700))]);
    for (const pdf of [regular!, bold!]) {
      for (const text of await texts(pdf)) {
        for (const n of NUMBERS) expect(text).toContain(n);
        expect(text).not.toMatch(/(^|\s)\.\d/);
      }
    }
  });
});
