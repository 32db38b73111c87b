/**
 * The label-template form: flat fields (one input each) mapped to the shared API body
 * (createLabelTemplateInputSchema, shared/schemas/printing.ts), so the browser checks exactly what the
 * server checks, including "the labels fit the page", and every message lands on its field.
 */
import type { FieldErrors, Resolver } from 'react-hook-form';
import {
  createLabelTemplateInputSchema,
  type CreateLabelTemplateInput,
  type LabelContent,
  type LabelTemplate,
  type LayoutKind,
  type PageSize,
} from '../../../shared/schemas/printing.ts';

export interface TemplateFormValues {
  name: string;
  widthMm: string;
  heightMm: string;
  content: LabelContent;
  active: boolean;
  kind: LayoutKind;
  pageSize: PageSize;
  rows: string;
  columns: string;
  marginTopMm: string;
  marginLeftMm: string;
  gapXMm: string;
  gapYMm: string;
}

export const TEMPLATE_FORM_FIELDS = [
  'name',
  'widthMm',
  'heightMm',
  'content',
  'active',
  'kind',
  'pageSize',
  'rows',
  'columns',
  'marginTopMm',
  'marginLeftMm',
  'gapXMm',
  'gapYMm',
] as const satisfies readonly (keyof TemplateFormValues)[];

export const EMPTY_TEMPLATE: TemplateFormValues = {
  name: '',
  widthMm: '',
  heightMm: '',
  content: 'full',
  active: true,
  kind: 'sheet',
  pageSize: 'A4',
  rows: '',
  columns: '',
  marginTopMm: '0',
  marginLeftMm: '0',
  gapXMm: '0',
  gapYMm: '0',
};

export function templateToForm(t: LabelTemplate): TemplateFormValues {
  const sheet = t.layout.kind === 'sheet' ? t.layout : null;
  return {
    name: t.name,
    widthMm: t.widthMm,
    heightMm: t.heightMm,
    content: t.content,
    active: t.active,
    kind: t.layout.kind,
    pageSize: sheet?.pageSize ?? 'A4',
    rows: sheet ? String(sheet.rows) : '',
    columns: sheet ? String(sheet.columns) : '',
    marginTopMm: sheet?.marginTopMm ?? '0',
    marginLeftMm: sheet?.marginLeftMm ?? '0',
    gapXMm: sheet?.gapXMm ?? '0',
    gapYMm: sheet?.gapYMm ?? '0',
  };
}

/** A typed count: a whole-number text becomes a number; anything else stays as typed so the schema names the problem. */
function count(s: string): unknown {
  const t = s.trim();
  if (t === '') return undefined;
  return /^\d+(\.\d+)?$/.test(t) ? Number(t) : t;
}

/** The API body for these form values (not yet validated). */
export function formToInput(v: TemplateFormValues): unknown {
  return {
    name: v.name,
    widthMm: v.widthMm,
    heightMm: v.heightMm,
    content: v.content,
    active: v.active,
    layout:
      v.kind === 'roll'
        ? { kind: 'roll' }
        : {
            kind: 'sheet',
            pageSize: v.pageSize,
            rows: count(v.rows),
            columns: count(v.columns),
            marginTopMm: v.marginTopMm,
            marginLeftMm: v.marginLeftMm,
            gapXMm: v.gapXMm,
            gapYMm: v.gapYMm,
          },
  };
}

/** API/zod path → form field: "layout.rows" → "rows", "layout" → "kind". */
export function formFieldFor(path: string): keyof TemplateFormValues | null {
  const parts = path.split('.');
  if (parts[0] === 'layout') {
    const leaf = parts[1] ?? 'kind';
    return (TEMPLATE_FORM_FIELDS as readonly string[]).includes(leaf) ? (leaf as keyof TemplateFormValues) : 'kind';
  }
  return (TEMPLATE_FORM_FIELDS as readonly string[]).includes(parts[0]!) ? (parts[0] as keyof TemplateFormValues) : null;
}

export function parseTemplateForm(v: TemplateFormValues): { ok: true; input: CreateLabelTemplateInput } | { ok: false; errors: Partial<Record<keyof TemplateFormValues, string>>; other: string[] } {
  const r = createLabelTemplateInputSchema.safeParse(formToInput(v));
  if (r.success) return { ok: true, input: r.data };
  const errors: Partial<Record<keyof TemplateFormValues, string>> = {};
  const other: string[] = [];
  for (const issue of r.error.issues) {
    const field = formFieldFor(issue.path.map(String).join('.'));
    if (!field) other.push(issue.message);
    else if (!errors[field]) errors[field] = issue.message;
  }
  return { ok: false, errors, other };
}

export const templateResolver: Resolver<TemplateFormValues> = async (values) => {
  const r = parseTemplateForm(values);
  if (r.ok) return { values, errors: {} };
  const errors: FieldErrors<TemplateFormValues> = {};
  for (const [k, message] of Object.entries(r.errors)) {
    (errors as Record<string, { type: string; message: string }>)[k] = { type: 'validate', message: message! };
  }
  return { values: {}, errors };
};
