/**
 * 2D codes as PNG buffers (bwip-js, pure JS): Data Matrix on labels (the identifier), QR on the prep sheet
 * (identifier and version). The options are exported so tests render the code exactly as the PDF does.
 */
import bwipjs from 'bwip-js/node';

/** Data Matrix (ECC 200) of the container identifier, e.g. "HWL-2026-0042". */
export const dataMatrixOptions = (text: string) => ({ bcid: 'datamatrix', text, scale: 6, paddingwidth: 0, paddingheight: 0 });

/** QR code of the record: "<identifier>;v<version>", e.g. "HWL-2026-0042;v2". */
export const qrOptions = (text: string) => ({ bcid: 'qrcode', text, scale: 4, eclevel: 'M', paddingwidth: 0, paddingheight: 0 });

export const recordCode = (identifier: string, version: number) => `${identifier};v${version}`;

/**
 * Rendered codes, keyed on the symbology and the encoded text (the PNG depends on nothing else: the options are
 * fixed above), so a hit is always the image a fresh render would give; a record's new version has a new text.
 * Dropped whole past 2000 entries; a failed render is not kept.
 */
const cache = new Map<string, Promise<Buffer>>();

function cached(key: string, make: () => Promise<Buffer>): Promise<Buffer> {
  let hit = cache.get(key);
  if (!hit) {
    hit = make();
    hit.catch(() => cache.delete(key));
    if (cache.size > 2000) cache.clear();
    cache.set(key, hit);
  }
  return hit;
}

export function dataMatrixPng(text: string): Promise<Buffer> {
  return cached(`dm:${text}`, () => bwipjs.toBuffer(dataMatrixOptions(text) as bwipjs.RenderOptions));
}

export function qrPng(text: string): Promise<Buffer> {
  return cached(`qr:${text}`, () => bwipjs.toBuffer(qrOptions(text) as bwipjs.RenderOptions));
}
