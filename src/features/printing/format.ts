/** Display helpers for label templates and prints. Lengths stay decimal strings (mm). */
import type { LabelTemplate } from '../../../shared/schemas/printing.ts';

/** "62 × 30 mm" */
export function templateSize(t: Pick<LabelTemplate, 'widthMm' | 'heightMm'>): string {
  return `${t.widthMm} × ${t.heightMm} mm`;
}

/** "A4 sheet, 9 rows × 3 columns (27 per page)" or "roll, one label per page". */
export function templateLayout(t: Pick<LabelTemplate, 'layout' | 'labelsPerPage'>): string {
  const l = t.layout;
  if (l.kind === 'roll') return 'roll, one label per page';
  return `${l.pageSize} sheet, ${l.rows} ${l.rows === 1 ? 'row' : 'rows'} × ${l.columns} ${l.columns === 1 ? 'column' : 'columns'} (${t.labelsPerPage} per page)`;
}

export function templateContent(content: string): string {
  return content === 'small' ? 'small (identifier, code, expiry)' : 'full content';
}

/** "62 × 30 mm · full content · A4 sheet, 9 rows × 3 columns (27 per page)" */
export function templateSummary(t: LabelTemplate): string {
  return `${templateSize(t)} · ${templateContent(t.content)} · ${templateLayout(t)}`;
}

/** How many pages `copies` labels take on this template. */
export function pagesFor(t: Pick<LabelTemplate, 'labelsPerPage'>, copies: number): number {
  const per = Math.max(1, t.labelsPerPage);
  return Math.max(1, Math.ceil(copies / per));
}
