/**
 * Printing API: prep sheets and vial labels (PDF rendered on the server), label templates and the
 * append-only record of label prints. Lengths are decimal strings in millimetres; times are UTC ISO.
 *
 *   GET   /api/preparations/:key/prep-sheet.pdf                    any signed-in  -> application/pdf (audited "print", kind prep_sheet)
 *   GET   /api/label-templates                                     any signed-in  -> LabelTemplateList
 *   POST  /api/label-templates        createLabelTemplateInputSchema   admin     -> LabelTemplate (201)
 *   PATCH /api/label-templates/:id    updateLabelTemplateInputSchema   admin     -> LabelTemplate
 *   GET   /api/preparations/:key/labels-preview.pdf?templateId=&copies=  any signed-in -> application/pdf ("PREVIEW – NOT A PRINT RECORD", not recorded)
 *   POST  /api/preparations/:key/label-prints  labelPrintInputSchema  chemist, technician -> LabelPrintCreated (201)
 *                                                                     400 fields.reason for a reprint without a reason; 409 for expired/discarded
 *   GET   /api/preparations/:key/label-prints                      any signed-in  -> LabelPrintHistory
 *   GET   /api/label-prints/:id/labels.pdf                         any signed-in  -> application/pdf (re-rendered from the stored print)
 */
import Decimal from 'decimal.js';
import { z } from 'zod';
import { lineText, multilineText } from './text.ts';
import { DECIMAL_TEXT } from './decimal-text.ts';

// ---------------------------------------------------------------- constants

export const PAGE_SIZES = ['A4', 'Letter'] as const;
export type PageSize = (typeof PAGE_SIZES)[number];
/** Page sizes in millimetres (ISO 216 A4 210 × 297; US Letter 8.5 × 11 in = 215.9 × 279.4). */
export const PAGE_SIZE_MM: Record<PageSize, { width: string; height: string }> = {
  A4: { width: '210', height: '297' },
  Letter: { width: '215.9', height: '279.4' },
};

export const LABEL_CONTENTS = ['full', 'small'] as const;
export type LabelContent = (typeof LABEL_CONTENTS)[number];
export const LAYOUT_KINDS = ['sheet', 'roll'] as const;
export type LayoutKind = (typeof LAYOUT_KINDS)[number];

export const MAX_LABEL_COPIES = 500;

/** Printed on every page of a record that is not verified, and on every label printed before verification. */
export const UNVERIFIED_MARK = 'NOT VERIFIED – DO NOT USE FOR RESULTS';
/** Printed on every label of a preview (GET labels-preview.pdf); previews are not print records. */
export const PREVIEW_MARK = 'PREVIEW – NOT A PRINT RECORD';
/** Printed on the labels of a print whose number is 2 or more. */
export const REPRINT_MARK = 'REPRINT';

// ---------------------------------------------------------------- helpers

const mm = (what: string, max: string, allowZero: boolean) =>
  z
    .string({ error: `Enter ${what} in mm, e.g. 25.4` })
    .trim()
    .regex(DECIMAL_TEXT, { error: `Enter ${what} in mm as a decimal number such as 25.4`, abort: true })
    .refine(
      (s) => {
        if (!DECIMAL_TEXT.test(s)) return true;
        const d = new Decimal(s);
        return (allowZero ? d.gte(0) : d.gt(0)) && d.lte(max);
      },
      `${what.charAt(0).toUpperCase() + what.slice(1)} must be ${allowZero ? 'from 0' : 'greater than 0'} and at most ${max} mm`,
    );

const count = (what: string, max: number) =>
  z
    .number({ error: `Enter the number of ${what}` })
    .int(`The number of ${what} is a whole number`)
    .min(1, `Use 1 to ${max} ${what}`)
    .max(max, `Use 1 to ${max} ${what}`);

const name = lineText({ error: 'Enter a template name' })
  .trim()
  .min(1, 'Enter a template name')
  .max(80, 'Use at most 80 characters');

// ---------------------------------------------------------------- label templates

export const sheetLayoutSchema = z.object({
  kind: z.literal('sheet'),
  pageSize: z.enum(PAGE_SIZES, { error: `Choose a page size: ${PAGE_SIZES.join(' or ')}` }),
  rows: count('rows', 50),
  columns: count('columns', 20),
  marginTopMm: mm('the top margin', '100', true),
  marginLeftMm: mm('the left margin', '100', true),
  gapXMm: mm('the gap between columns', '50', true),
  gapYMm: mm('the gap between rows', '50', true),
});
export type SheetLayout = z.output<typeof sheetLayoutSchema>;

/** One label per page (roll printers); the page is the label. */
export const rollLayoutSchema = z.object({ kind: z.literal('roll') });
export type RollLayout = z.output<typeof rollLayoutSchema>;

export const labelLayoutSchema = z.discriminatedUnion('kind', [sheetLayoutSchema, rollLayoutSchema], {
  error: 'Choose a layout: { kind: "sheet", … } or { kind: "roll" }',
});
export type LabelLayout = SheetLayout | RollLayout;

const templateFields = {
  name,
  widthMm: mm('the label width', '300', false),
  heightMm: mm('the label height', '300', false),
  layout: labelLayoutSchema,
  content: z.enum(LABEL_CONTENTS, { error: 'Choose the label content: full or small' }),
  active: z.boolean({ error: 'active is true or false' }).optional(),
};

/**
 * The labels of a sheet must fit the page:
 *   marginLeft + columns × width + (columns − 1) × gapX ≤ page width (and the same for rows/height).
 */
export function sheetFitIssues(t: { widthMm: string; heightMm: string; layout: LabelLayout }): Array<{ path: string[]; message: string }> {
  if (t.layout.kind !== 'sheet') return [];
  const l = t.layout;
  if (![t.widthMm, t.heightMm, l.marginLeftMm, l.marginTopMm, l.gapXMm, l.gapYMm].every((s) => DECIMAL_TEXT.test(s))) return [];
  const page = PAGE_SIZE_MM[l.pageSize];
  const usedW = new Decimal(l.marginLeftMm).plus(new Decimal(t.widthMm).times(l.columns)).plus(new Decimal(l.gapXMm).times(l.columns - 1));
  const usedH = new Decimal(l.marginTopMm).plus(new Decimal(t.heightMm).times(l.rows)).plus(new Decimal(l.gapYMm).times(l.rows - 1));
  const issues: Array<{ path: string[]; message: string }> = [];
  if (usedW.gt(page.width)) {
    issues.push({ path: ['layout', 'columns'], message: `${l.columns} columns need ${usedW.toString()} mm but the ${l.pageSize} page is ${page.width} mm wide` });
  }
  if (usedH.gt(page.height)) {
    issues.push({ path: ['layout', 'rows'], message: `${l.rows} rows need ${usedH.toString()} mm but the ${l.pageSize} page is ${page.height} mm high` });
  }
  return issues;
}

/** Body of POST /api/label-templates. */
export const createLabelTemplateInputSchema = z.object(templateFields).superRefine((t, ctx) => {
  for (const i of sheetFitIssues(t)) ctx.addIssue({ code: 'custom', path: i.path, message: i.message });
});
export type CreateLabelTemplateInput = z.output<typeof createLabelTemplateInputSchema>;

/** Body of PATCH /api/label-templates/:id: any subset (the merged template is checked to fit its page on the server). */
export const updateLabelTemplateInputSchema = z
  .object(templateFields)
  .partial()
  .refine((o) => Object.keys(o).length > 0, 'Change at least one field');
export type UpdateLabelTemplateInput = z.output<typeof updateLabelTemplateInputSchema>;

export interface LabelTemplate {
  id: number;
  name: string;
  widthMm: string;
  heightMm: string;
  layout: LabelLayout;
  content: LabelContent;
  active: boolean;
  /** labels per page: rows × columns for a sheet, 1 for a roll */
  labelsPerPage: number;
  createdAt: string;
  updatedAt: string;
}

export interface LabelTemplateList {
  items: LabelTemplate[];
}

// ---------------------------------------------------------------- label prints

/** Body of POST /api/preparations/:key/label-prints. */
export const labelPrintInputSchema = z.object({
  templateId: z.number({ error: 'Choose a label template' }).int('Choose a label template').positive('Choose a label template'),
  copies: count('copies', MAX_LABEL_COPIES),
  /** required (server-checked, 400 fields.reason) when labels of this preparation version and template were printed before */
  reason: multilineText({ error: 'Give the reason for the reprint' }).trim().max(500, 'Use at most 500 characters').optional(),
});
export type LabelPrintInput = z.output<typeof labelPrintInputSchema>;

/** Query of GET /api/preparations/:key/labels-preview.pdf. */
export const labelPreviewQuerySchema = z.object({
  templateId: z.coerce.number({ error: 'Choose a label template' }).int('Choose a label template').positive('Choose a label template'),
  copies: z.coerce
    .number({ error: `copies is 1 to ${MAX_LABEL_COPIES}` })
    .int(`copies is 1 to ${MAX_LABEL_COPIES}`)
    .min(1, `copies is 1 to ${MAX_LABEL_COPIES}`)
    .max(MAX_LABEL_COPIES, `copies is 1 to ${MAX_LABEL_COPIES}`)
    .default(1),
});
export type LabelPreviewQuery = z.output<typeof labelPreviewQuerySchema>;

/** Query of GET /api/preparations/:key/prep-sheet.pdf: preview=1 shows the sheet without recording a print. */
export const prepSheetQuerySchema = z.object({
  preview: z.enum(['0', '1'], { error: 'preview is 1 (show, not recorded) or 0 (print, recorded)' }).optional(),
});

export interface LabelPrint {
  id: number;
  preparationId: number;
  identifier: string;
  preparationVersion: number;
  /** 1 = original; 2, 3, … = reprints (counted per preparation version and template) */
  number: number;
  isReprint: boolean;
  copies: number;
  templateId: number;
  templateName: string;
  /** status of the record when printed; anything but "verified" puts the unverified mark on the labels */
  statusAtPrint: string;
  printedBy: { id: number; fullName: string };
  printedAt: string;
  reason: string | null;
}

/** 201 body of POST /api/preparations/:key/label-prints. */
export interface LabelPrintCreated {
  print: LabelPrint;
  /** GET this for the PDF of the print */
  pdfUrl: string;
}

/** GET /api/preparations/:key/label-prints: newest first. */
export interface LabelPrintHistory {
  items: LabelPrint[];
  counts: {
    /** prints with number 1 */
    originals: number;
    reprints: number;
    /** labels printed, all prints together */
    labels: number;
  };
}
