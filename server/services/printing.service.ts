/**
 * Printing: the prep sheet and vial labels as PDF (REQUIREMENTS 1B LB-01…LB-07).
 *
 * - Data come only through the preparations service (the record as stored), the settings and the audit
 *   trail; nothing a client sends changes what a sheet or label says (LB-06).
 * - Every prep sheet served and every label print is recorded in the audit trail (action "print",
 *   entity "preparation", changes.kind = prep_sheet | labels) in a write transaction.
 * - Label prints are append-only rows: the template and the label content are stored with the print, so
 *   GET /api/label-prints/:id/labels.pdf renders the same PDF from the stored row every time.
 * - The first label print of a record is the original; every later one (any version, any template) is a
 *   reprint: it needs a reason, carries "REPRINT n" and is counted (LB-07). Expired and discarded records
 *   cannot be labelled (409).
 * - A prep sheet shown as a preview (?preview=1, the Print page's frame) is marked and not recorded.
 */
import { Op } from 'sequelize';
import type { AuditEntryDto } from '../../shared/schemas/audit.ts';
import type { PreparationDetail, Signature } from '../../shared/schemas/preparations.ts';
import type { LabelPreviewQuery, LabelPrint as LabelPrintDto, LabelPrintCreated, LabelPrintHistory, LabelPrintInput } from '../../shared/schemas/printing.ts';
import { AuditEntry, LabelPrint, User, type LabelSnapshot } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { dataMatrixPng, qrPng, recordCode } from '../pdf/barcodes.ts';
import { labDay } from '../pdf/format.ts';
import { isVerified } from '../pdf/prep-sheet.tsx';
import { renderLabels, renderPrepSheet } from '../pdf/render.ts';
import { preparationTrail, recordAudit } from './audit.service.ts';
import { getLabelTemplate, templateSnapshot } from './label-templates.service.ts';
import { getPreparation } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';
import type { LineageSection } from '../../shared/schemas/lineage.ts';
import { mixLabelText } from './mix-view.ts';
import { DEFAULT_SOLUTION_STORAGE, type LabSettings } from '../../shared/schemas/settings.ts';
import { selectStabilityRule } from '../../shared/prep/stability-rules.ts';

export interface Actor {
  id: number;
  fullName: string;
}

/** Statuses for which no label may be printed (409). */
export const NOT_LABELLABLE = ['expired', 'discarded'] as const;

const signaturesOf = (d: PreparationDetail): Signature[] => (Array.isArray(d.signatures) ? d.signatures : []);

// ------------------------------------------------------------------ prep sheet

/**
 * The record-level trail, oldest first: the preparation and every weighing, make-up, aliquot and gravimetric
 * reading recorded for it (audit.preparationTrail, as the record page shows it).
 */
async function recordLevelTrail(d: PreparationDetail): Promise<AuditEntryDto[]> {
  return preparationTrail(String(d.id));
}

/**
 * GET /api/preparations/:key/prep-sheet.pdf: renders the current version and records the print (the user asked
 * to print it). With `preview` (?preview=1, the sheet shown on the Print page) it is marked as a preview and
 * nothing is recorded: viewing a page is not printing.
 */
export async function prepSheetPdf(key: string, actor: Actor, opts: { preview?: boolean } = {}): Promise<{ pdf: Buffer; filename: string }> {
  const [detail, settings] = await Promise.all([getPreparation(key), getSettings()]);
  const trail = await recordLevelTrail(detail);
  const qrText = recordCode(detail.identifier, detail.version);
  const generatedAt = new Date().toISOString();
  const pdf = await renderPrepSheet({
    lab: { name: settings.labName, timeZone: settings.timeZone },
    detail,
    signatures: signaturesOf(detail),
    trail: trail.filter((e) => e.action !== 'print'),
    printCount: trail.filter((e) => e.action === 'print').length,
    generatedAt,
    generatedBy: actor.fullName,
    qr: await qrPng(qrText),
    qrText,
    preview: opts.preview === true,
  });
  if (opts.preview) return { pdf, filename: `${detail.identifier}-v${detail.version}-prep-sheet-preview.pdf` };
  await writeTransaction((transaction) =>
    recordAudit(
      {
        actor,
        action: 'print',
        entity: 'preparation',
        entityId: detail.id,
        changes: [
          { field: 'kind', oldValue: null, newValue: 'prep_sheet' },
          { field: 'version', oldValue: null, newValue: detail.version },
          { field: 'status', oldValue: null, newValue: detail.status },
        ],
      },
      transaction,
    ),
  );
  return { pdf, filename: `${detail.identifier}-v${detail.version}-prep-sheet.pdf` };
}

// ------------------------------------------------------------------ labels

/** The concentration that counts: a stock's result, or a dilution's result from its aliquot and make-up (lineage section). */
function recordConcentration(d: PreparationDetail): { value: string; unit: string; display: string } | null {
  if (d.result) return d.result.concentration;
  const mix = mixLabelText(d as PreparationDetail & LineageSection); // a mix: every analyte (mix-view.ts)
  if (mix) return { value: mix.short, unit: '', display: mix.display };
  const grav = (d as PreparationDetail & { gravimetric?: { result?: { massFraction: { value: string }; display: string } } }).gravimetric?.result; // a dilution by mass: mg/kg (and mg/L in the display)
  if (grav) return { value: grav.massFraction.value, unit: 'mg/kg', display: grav.display };
  return (d as PreparationDetail & { dilution?: { result?: { value: string; unit: string; display: string } } }).dilution?.result ?? null;
}

/** "1001.0 ± 2.7 mg/L (k = 2)" → "1001.0 mg/L" (the value as displayed, with its unit). */
function shortConcentration(d: PreparationDetail): string {
  const mix = mixLabelText(d as PreparationDetail & LineageSection);
  if (mix) return mix.short;
  const c = recordConcentration(d);
  if (!c) return `${d.target.value} ${d.target.unit} (planned)`;
  const m = /^\s*([^\s±]+)\s*±/.exec(c.display);
  return `${m ? m[1] : c.value} ${c.unit}`;
}

async function preparerInitials(d: PreparationDetail): Promise<string> {
  const prepared = signaturesOf(d).filter((s) => s.meaning === 'prepared' && s.valid).at(-1);
  if (prepared) {
    const u = await User.findByPk(prepared.signer.id);
    if (u?.initials) return u.initials;
  }
  return d.createdBy.initials;
}

/**
 * How the solution is stored: the stability rule that applies to the record, if it says, else the lab's rule
 * for prepared solutions. Never the reference material's storage: that is for the solid (drying, desiccator).
 */
export function solutionStorageOf(d: Pick<PreparationDetail, 'analyteFormula' | 'target'> & Partial<Pick<LineageSection, 'kind'>>, settings: LabSettings): string {
  const rule = selectStabilityRule(settings.stabilityRules, { kind: d.kind ?? 'stock', analyteFormula: d.analyteFormula, concentration: d.target }, { days: 0, basis: '' });
  return rule.storage ?? settings.solutionStorage ?? DEFAULT_SOLUTION_STORAGE;
}

/** The label content of the record as it is now (LB-01, LB-02, LB-03, LB-04, LB-09). */
export async function labelSnapshotOf(d: PreparationDetail, timeZone: string): Promise<LabelSnapshot> {
  const preparedAt = d.makeUp?.recordedAt ?? d.createdAt;
  return {
    identifier: d.identifier,
    version: d.version,
    status: d.status,
    materialName: d.materialName,
    analyteFormula: d.analyteFormula,
    concentration: recordConcentration(d)?.display ?? `${d.target.value} ${d.target.unit} (planned; not yet made up)`,
    concentrationShort: shortConcentration(d),
    solvent: d.makeUp ? d.makeUp.solvent.name : null,
    preparedOn: labDay(preparedAt, timeZone),
    expiresOn: d.expiry.expiresOn,
    preparerInitials: await preparerInitials(d),
    storage: solutionStorageOf(d as PreparationDetail & Partial<LineageSection>, await getSettings()),
    pictograms: d.hazards.pictograms,
  };
}

async function activeTemplate(templateId: number, field = 'templateId') {
  const t = await getLabelTemplate(templateId).catch((err: unknown) => {
    if (err instanceof AppError && err.status === 404) throw AppError.validation(`No label template with id ${templateId}`, { [field]: 'Choose one of the label templates' });
    throw err;
  });
  if (!t.active) throw AppError.validation(`The label template "${t.name}" is no longer in use`, { [field]: 'Choose a template that is in use' });
  return t;
}

/** GET /api/preparations/:key/labels-preview.pdf: marked as a preview, not recorded. */
export async function labelsPreviewPdf(key: string, q: LabelPreviewQuery): Promise<{ pdf: Buffer; filename: string }> {
  const [detail, settings, template] = await Promise.all([getPreparation(key), getSettings(), activeTemplate(q.templateId)]);
  const label = await labelSnapshotOf(detail, settings.timeZone);
  const pdf = await renderLabels({
    template: templateSnapshot(template),
    label,
    copies: q.copies,
    marks: { unverified: !isVerified(detail.status), preview: true, reprint: null },
    dataMatrix: await dataMatrixPng(label.identifier),
    createdAt: new Date().toISOString(),
  });
  return { pdf, filename: `${detail.identifier}-v${detail.version}-labels-preview.pdf` };
}

function printDto(p: LabelPrint, identifier: string): LabelPrintDto {
  return {
    id: p.id,
    preparationId: p.preparationId,
    identifier,
    preparationVersion: p.preparationVersion,
    number: p.number,
    isReprint: Boolean(p.isReprint),
    copies: p.copies,
    templateId: p.templateId,
    templateName: p.templateSnapshot.name,
    statusAtPrint: p.statusAtPrint,
    printedBy: { id: p.printedBy, fullName: p.printedByName },
    printedAt: p.printedAt,
    reason: p.reason,
  };
}

/** POST /api/preparations/:key/label-prints (chemist, technician). */
export async function createLabelPrint(key: string, input: LabelPrintInput, actor: Actor): Promise<LabelPrintCreated> {
  const [detail, settings, template] = await Promise.all([getPreparation(key), getSettings(), activeTemplate(input.templateId)]);
  const today = labDay(new Date().toISOString(), settings.timeZone);
  if (detail.sealBroken) {
    // a signed record whose data no longer match its signatures (record-integrity.ts): no label may carry its numbers
    throw new AppError('seal_broken', 409, `Labels cannot be printed for ${detail.identifier}: it no longer matches its signatures (seal broken); QA must investigate`, { fields: { preparation: detail.sealBroken.problems.join('; ') } });
  }
  // the date first: a live record past its expiry is shown as 'expired' (expiry-extension.service), say when
  if (detail.expiry.expiresOn < today) {
    throw AppError.conflict(`Labels cannot be printed for ${detail.identifier}: it expired on ${detail.expiry.expiresOn}`);
  }
  if ((NOT_LABELLABLE as readonly string[]).includes(detail.status)) {
    throw AppError.conflict(`Labels cannot be printed for ${detail.identifier}: the record is ${detail.status}`);
  }
  const label = await labelSnapshotOf(detail, settings.timeZone);
  const reason = input.reason && input.reason.length > 0 ? input.reason : null;

  const created = await writeTransaction(async (transaction) => {
    // a record's labels are printed once; every later print, whatever the template or version, is a reprint
    const earlier = await LabelPrint.count({ where: { preparationId: detail.id }, transaction });
    const number = earlier + 1;
    if (number > 1 && (!reason || reason.length < 3)) {
      throw AppError.validation(
        `Labels of ${detail.identifier} were already printed (${earlier} time${earlier === 1 ? '' : 's'}); a reprint needs a reason`,
        { reason: 'Give the reason for the reprint (at least 3 characters), and destroy the labels it replaces' },
      );
    }
    const row = await LabelPrint.create(
      {
        preparationId: detail.id,
        preparationVersion: detail.version,
        templateId: template.id,
        templateSnapshot: templateSnapshot(template),
        labelSnapshot: label,
        statusAtPrint: detail.status,
        copies: input.copies,
        number,
        isReprint: number > 1,
        reason,
        printedBy: actor.id,
        printedByName: actor.fullName,
        printedAt: new Date().toISOString(),
      },
      { transaction },
    );
    await recordAudit(
      {
        actor,
        action: 'print',
        entity: 'preparation',
        entityId: detail.id,
        changes: [
          { field: 'kind', oldValue: null, newValue: 'labels' },
          { field: 'labelPrintId', oldValue: null, newValue: row.id },
          { field: 'version', oldValue: null, newValue: detail.version },
          { field: 'template', oldValue: null, newValue: template.name },
          { field: 'copies', oldValue: null, newValue: input.copies },
          { field: 'number', oldValue: null, newValue: number },
          { field: 'isReprint', oldValue: null, newValue: number > 1 },
          { field: 'status', oldValue: null, newValue: detail.status },
        ],
        reason,
      },
      transaction,
    );
    return row;
  });
  return { print: printDto(created, detail.identifier), pdfUrl: `/api/label-prints/${created.id}/labels.pdf` };
}

/** GET /api/label-prints/:id/labels.pdf: the PDF of a stored print, rendered from the stored row. */
export async function labelPrintPdf(id: number): Promise<{ pdf: Buffer; filename: string }> {
  const row = await LabelPrint.findByPk(id);
  if (!row) throw AppError.notFound(`Label print ${id}`);
  const label = row.labelSnapshot;
  const pdf = await renderLabels({
    template: row.templateSnapshot,
    label,
    copies: row.copies,
    marks: { unverified: !isVerified(row.statusAtPrint), preview: false, reprint: row.number > 1 ? row.number - 1 : null },
    dataMatrix: await dataMatrixPng(label.identifier),
    createdAt: row.printedAt,
  });
  return { pdf, filename: `${label.identifier}-v${row.preparationVersion}-labels-${row.number}.pdf` };
}

/** GET /api/preparations/:key/label-prints: newest first, with counts. */
export async function labelPrintHistory(key: string): Promise<LabelPrintHistory> {
  const detail = await getPreparation(key);
  const rows = await LabelPrint.findAll({ where: { preparationId: detail.id }, order: [['id', 'DESC']] });
  const items = rows.map((r) => printDto(r, detail.identifier));
  return {
    items,
    counts: {
      originals: items.filter((p) => !p.isReprint).length,
      reprints: items.filter((p) => p.isReprint).length,
      labels: items.reduce((n, p) => n + p.copies, 0),
    },
  };
}

/** How many print entries the audit trail holds for a preparation (prep sheets and label prints). */
export async function printEntries(preparationId: number): Promise<number> {
  return AuditEntry.count({ where: { entity: 'preparation', entityId: String(preparationId), action: { [Op.eq]: 'print' } } });
}
