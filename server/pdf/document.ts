/**
 * The one way a PDF is rendered: every document waits for the fonts to be loaded and prepared
 * (fonts.ts fontsReady) before react-pdf lays it out, so documents rendered at the same time cannot
 * change one another's glyphs.
 */
import type { ReactElement } from 'react';
import { renderToBuffer, type DocumentProps } from '@react-pdf/renderer';
import { fontsReady } from './fonts.ts';

export async function renderDocument(element: ReactElement): Promise<Buffer> {
  await fontsReady();
  return renderToBuffer(element as ReactElement<DocumentProps>);
}
