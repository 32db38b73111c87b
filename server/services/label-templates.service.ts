/**
 * Label templates (lab configuration; admins create and edit them, everyone signed in can list them).
 * Every change is audited in the same transaction (entity "label_template"). Templates are never deleted:
 * set `active: false` to stop offering one; prints keep their own snapshot of the template they used.
 */
import { Op } from 'sequelize';
import {
  createLabelTemplateInputSchema,
  sheetFitIssues,
  type CreateLabelTemplateInput,
  type LabelTemplate as LabelTemplateDto,
  type LabelTemplateList,
  type UpdateLabelTemplateInput,
} from '../../shared/schemas/printing.ts';
import { LabelTemplate, type TemplateSnapshot } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';

export interface Actor {
  id: number;
  fullName: string;
}

export function templateDto(t: LabelTemplate): LabelTemplateDto {
  return {
    id: t.id,
    name: t.name,
    widthMm: t.widthMm,
    heightMm: t.heightMm,
    layout: t.layout,
    content: t.content,
    active: Boolean(t.active),
    labelsPerPage: t.layout.kind === 'sheet' ? t.layout.rows * t.layout.columns : 1,
    createdAt: t.createdAt,
    updatedAt: t.updatedAt,
  };
}

export function templateSnapshot(t: LabelTemplate): TemplateSnapshot {
  return { id: t.id, name: t.name, widthMm: t.widthMm, heightMm: t.heightMm, layout: t.layout, content: t.content };
}

const view = (d: LabelTemplateDto) => ({ name: d.name, widthMm: d.widthMm, heightMm: d.heightMm, layout: d.layout, content: d.content, active: d.active });

export async function listLabelTemplates(): Promise<LabelTemplateList> {
  const rows = await LabelTemplate.findAll({ order: [['name', 'ASC']] });
  return { items: rows.map(templateDto) };
}

export async function getLabelTemplate(id: number): Promise<LabelTemplate> {
  const row = await LabelTemplate.findByPk(id);
  if (!row) throw AppError.notFound(`Label template ${id}`);
  return row;
}

async function assertNameFree(name: string, exceptId: number | null): Promise<void> {
  const clash = await LabelTemplate.findOne({ where: { name, ...(exceptId ? { id: { [Op.ne]: exceptId } } : {}) } });
  if (clash) throw AppError.conflict(`A label template named "${name}" already exists`, { name: 'Choose another name; this one is taken' });
}

/** POST /api/label-templates (admin). */
export async function createLabelTemplate(input: CreateLabelTemplateInput, actor: Actor): Promise<LabelTemplateDto> {
  return writeTransaction(async (transaction) => {
    await assertNameFree(input.name, null);
    const row = await LabelTemplate.create(
      { name: input.name, widthMm: input.widthMm, heightMm: input.heightMm, layout: input.layout, content: input.content, active: input.active ?? true },
      { transaction },
    );
    const dto = templateDto(row);
    await recordAudit({ actor, action: 'create', entity: 'label_template', entityId: row.id, changes: diffFields({}, view(dto)) }, transaction);
    return dto;
  });
}

/** PATCH /api/label-templates/:id (admin): any subset; the merged template must still be valid and fit its page. */
export async function updateLabelTemplate(id: number, input: UpdateLabelTemplateInput, actor: Actor): Promise<LabelTemplateDto> {
  return writeTransaction(async (transaction) => {
    const row = await LabelTemplate.findByPk(id, { transaction });
    if (!row) throw AppError.notFound(`Label template ${id}`);
    const before = templateDto(row);
    const merged = { ...view(before), ...Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)) };
    const parsed = createLabelTemplateInputSchema.safeParse(merged);
    if (!parsed.success) throw parsed.error;
    const issues = sheetFitIssues(parsed.data);
    if (issues.length) throw AppError.validation(issues[0]!.message, Object.fromEntries(issues.map((i) => [i.path.join('.'), i.message])));
    if (input.name !== undefined) await assertNameFree(parsed.data.name, id);
    const changes = diffFields(view(before), { ...parsed.data, active: parsed.data.active ?? before.active });
    if (!changes.length) return before;
    row.set({ name: parsed.data.name, widthMm: parsed.data.widthMm, heightMm: parsed.data.heightMm, layout: parsed.data.layout, content: parsed.data.content, active: parsed.data.active ?? before.active });
    await row.save({ transaction });
    const dto = templateDto(row);
    await recordAudit({ actor, action: 'update', entity: 'label_template', entityId: id, changes }, transaction);
    return dto;
  });
}
