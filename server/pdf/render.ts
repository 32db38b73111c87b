/**
 * PDF rendering entry points (server only). Fonts are registered on first use.
 */
import { createElement, type ReactElement } from 'react';
import { renderToBuffer, type DocumentProps } from '@react-pdf/renderer';
import { registerFonts } from './fonts.ts';
import { LabelsDocument, type LabelsData } from './labels.tsx';
import { MinimalDocument } from './minimal.tsx';
import { PrepSheetDocument, type PrepSheetData } from './prep-sheet.tsx';

async function render(element: ReactElement): Promise<Buffer> {
  registerFonts();
  return renderToBuffer(element as ReactElement<DocumentProps>);
}

export const renderPrepSheet = (data: PrepSheetData) => render(createElement(PrepSheetDocument, { data }));
export const renderLabels = (data: LabelsData) => render(createElement(LabelsDocument, { data }));
export const renderMinimal = () => render(createElement(MinimalDocument));

export type { LabelsData, PrepSheetData };
