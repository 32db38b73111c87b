export const printingKeys = {
  all: ['printing'] as const,
  templates: () => [...printingKeys.all, 'label-templates'] as const,
  history: (key: string) => [...printingKeys.all, 'label-prints', key] as const,
};

/** The PDF addresses of the printing API (shared/schemas/printing.ts); the server renders every PDF. */
export const printingUrls = {
  /** the sheet as printed: each request is recorded as a print (open it only when the user asks to print) */
  prepSheet: (key: string) => `/api/preparations/${encodeURIComponent(key)}/prep-sheet.pdf`,
  /** the sheet shown on the page: marked as a preview, not recorded */
  prepSheetPreview: (key: string) => `/api/preparations/${encodeURIComponent(key)}/prep-sheet.pdf?preview=1`,
  labelsPreview: (key: string, templateId: number, copies: number) =>
    `/api/preparations/${encodeURIComponent(key)}/labels-preview.pdf?templateId=${templateId}&copies=${copies}`,
  printLabels: (printId: number) => `/api/label-prints/${printId}/labels.pdf`,
};
