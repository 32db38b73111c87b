/**
 * PDF rendering entry points (server only). Fonts are loaded and prepared once, before the first render.
 */
import { createElement } from 'react';
import { renderDocument as render } from './document.ts';
import { LabelsDocument, type LabelsData } from './labels.tsx';
import { MinimalDocument } from './minimal.tsx';
import { PrepSheetDocument, type PrepSheetData } from './prep-sheet.tsx';

export const renderPrepSheet = (data: PrepSheetData) => render(createElement(PrepSheetDocument, { data }));
export const renderLabels = (data: LabelsData) => render(createElement(LabelsDocument, { data }));
export const renderMinimal = () => render(createElement(MinimalDocument));

export type { LabelsData, PrepSheetData };
