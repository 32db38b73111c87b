/**
 * Inventory: reference materials, balances, volumetric ware, solvents.
 * Lists filter, sort and page in SQL (indexes in migration 0004). Every write runs in writeTransaction
 * with its audit entry (old and new value per field). Items are retired, never deleted.
 * Decimal values stay strings end to end; the only arithmetic is the USP <41> minimum weight (decimal.js).
 */
import { Op, literal, type Model, type ModelStatic, type Order, type Transaction, type WhereOptions } from 'sequelize';
import { uspMinimumWeight } from '../../shared/calc/min-weight.ts';
import {
  balanceCreateInputSchema,
  materialCreateInputSchema,
  solventCreateInputSchema,
  wareCreateInputSchema,
  type Balance as BalanceDto,
  type BalanceCreate,
  type BalanceListQuery,
  type BalanceUpdate,
  type MaterialCreate,
  type MaterialListQuery,
  type MaterialUpdate,
  type Paged,
  type ReferenceMaterial as MaterialDto,
  type Solvent as SolventDto,
  type SolventCreate,
  type SolventListQuery,
  type SolventUpdate,
  type VolumetricWare as WareDto,
  type WareCreate,
  type WareListQuery,
  type WareUpdate,
} from '../../shared/schemas/inventory.ts';
import { Balance, ReferenceMaterial, Solvent, User, VolumetricWare } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { getSettings } from './settings.service.ts';
import { flasksHoldingSolutions } from './flask-occupancy.ts';
import { labDate } from '../../shared/prep/lab-time.ts';

export interface Actor {
  id: number;
  fullName: string;
}

type Change = { field: string; oldValue: unknown; newValue: unknown };

// ------------------------------------------------------------------------------------------- helpers

/** Today's calendar date (YYYY-MM-DD) in the lab's time zone (settings.timeZone). */
export async function labToday(now = new Date()): Promise<string> {
  return labDate(now, (await getSettings()).timeZone);
}

/** Drops keys whose value is undefined (zod's partial output may carry them). */
function given<T extends object>(o: T | undefined): Partial<T> {
  if (!o) return {};
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}

/** Fields of a DTO as the audit trail records them: no id/timestamps, nested objects flattened with dots. */
function auditView(dto: object, skip: string[] = []): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(dto)) {
    if (k === 'id' || k === 'createdAt' || k === 'updatedAt' || skip.includes(k)) continue;
    if (v && typeof v === 'object' && !Array.isArray(v) && k === 'purity') {
      for (const [k2, v2] of Object.entries(v)) out[`${k}.${k2}`] = v2;
    } else out[k] = v;
  }
  return out;
}

/**
 * Free-text search: every whitespace-separated term must appear (case-insensitive LIKE) in one of the
 * columns. Wildcards typed by the user are escaped. Column names come from this file only.
 */
function searchCondition(model: ModelStatic<Model>, columns: string[], search: string | undefined): WhereOptions[] {
  if (!search) return [];
  const terms = search.split(/\s+/).filter(Boolean).slice(0, 8);
  const sequelize = model.sequelize!;
  return terms.map((term) => {
    const like = sequelize.escape(`%${term.replace(/[\\%_]/g, (ch) => `\\${ch}`)}%`);
    return literal(`(${columns.map((c) => `\`${c}\` LIKE ${like} ESCAPE '\\'`).join(' OR ')})`) as unknown as WhereOptions;
  });
}

async function pageOf<M extends Model, D>(
  model: ModelStatic<M>,
  where: WhereOptions[],
  order: Order,
  query: { page: number; pageSize: number },
  toDto: (rows: M[]) => Promise<D[]> | D[],
): Promise<Paged<D>> {
  const { page, pageSize } = query;
  const { rows, count } = await model.findAndCountAll({
    where: where.length ? ({ [Op.and]: where } as WhereOptions<M>) : {},
    order,
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  return { items: await toDto(rows), total: count, page, pageSize };
}

/** ORDER BY the whitelisted column, then id, so equal keys page stably. */
function orderBy(column: string | ReturnType<typeof literal>, dir: 'asc' | 'desc'): Order {
  const d = dir === 'desc' ? 'DESC' : 'ASC';
  return [[column as never, d], ['id', d]];
}

async function loadOr404<M extends Model>(model: ModelStatic<M>, id: number, what: string, transaction?: Transaction): Promise<M> {
  const row = Number.isSafeInteger(id) && id > 0 ? await model.findByPk(id, { transaction }) : null;
  if (!row) throw AppError.notFound(what);
  return row;
}

function refuseRetired(status: string, what: string): void {
  if (status === 'retired') {
    throw new AppError('conflict', 409, `This ${what} is retired; a retired item is kept as it was and cannot be changed`, {
      fields: { status: 'Retired' },
    });
  }
}

/** Identifiers are unique for ever (retired items keep theirs), compared without regard to case. */
async function assertIdentifierFree(model: ModelStatic<Model>, identifier: string, exceptId: number | null, transaction: Transaction) {
  const sequelize = model.sequelize!;
  const clash = await model.findOne({
    where: {
      [Op.and]: [
        sequelize.where(sequelize.fn('lower', sequelize.col('identifier')), identifier.toLowerCase()),
        ...(exceptId ? [{ id: { [Op.ne]: exceptId } }] : []),
      ],
    } as WhereOptions,
    transaction,
  });
  if (clash) {
    throw AppError.conflict(`The identifier ${identifier} is already in use`, {
      identifier: `${identifier} is already in use (retired items keep their identifier)`,
    });
  }
}

/** Validates the record as it would be after a PATCH, with the create rules (cross-field checks). */
function checkMerged<T>(schema: { safeParse: (v: unknown) => { success: true; data: T } | { success: false; error: unknown } }, merged: unknown): T {
  const result = schema.safeParse(merged);
  if (!result.success) throw result.error;
  return result.data;
}

async function audited<D extends { id: number }>(
  transaction: Transaction,
  actor: Actor,
  entity: string,
  action: 'create' | 'update' | 'retire',
  before: Record<string, unknown>,
  after: D,
  view: (d: D) => Record<string, unknown>,
  reason?: string,
): Promise<Change[]> {
  const changes = diffFields(before, view(after));
  if (action !== 'update' || changes.length) {
    await recordAudit({ actor, action, entity, entityId: after.id, changes, reason: reason ?? null }, transaction);
  }
  return changes;
}

// ------------------------------------------------------------------------------------ reference materials

async function usersById(ids: Array<number | null | undefined>, transaction?: Transaction): Promise<Map<number, { id: number; fullName: string }>> {
  const wanted = [...new Set(ids.filter((x): x is number => typeof x === 'number'))];
  if (!wanted.length) return new Map();
  const users = await User.findAll({ where: { id: wanted }, attributes: ['id', 'fullName'], transaction });
  return new Map(users.map((u) => [u.id, { id: u.id, fullName: u.fullName }]));
}

function materialDto(m: ReferenceMaterial, users: Map<number, { id: number; fullName: string }>): MaterialDto {
  return {
    id: m.id,
    name: m.name,
    formula: m.formula,
    analytes: m.analytes,
    casNumber: m.casNumber,
    grade: m.grade,
    producer: m.producer,
    catalogueNumber: m.catalogueNumber,
    lot: m.lot,
    certificateNumber: m.certificateNumber,
    purity: {
      value: m.purityValue,
      expandedUncertainty: m.purityExpandedUncertainty,
      k: m.purityK,
      standardUncertainty: m.purityStandardUncertainty,
      basis: m.purityBasis,
    },
    densityGPerMl: m.densityValue,
    receivedOn: m.receivedOn,
    openedOn: m.openedOn,
    expiresOn: m.expiresOn,
    storage: m.storage,
    ghsHazardStatements: m.ghsHazardStatements,
    ghsPictograms: m.ghsPictograms,
    status: m.status,
    acceptedBy: m.acceptedById ? (users.get(m.acceptedById) ?? { id: m.acceptedById, fullName: '' }) : null,
    acceptedAt: m.acceptedAt ?? null,
    retiredAt: m.retiredAt ?? null,
    retiredReason: m.retiredReason ?? null,
    createdAt: m.createdAt,
    updatedAt: m.updatedAt,
  };
}

export async function materialDtos(rows: ReferenceMaterial[], transaction?: Transaction): Promise<MaterialDto[]> {
  const users = await usersById(
    rows.map((r) => r.acceptedById),
    transaction,
  );
  return rows.map((r) => materialDto(r, users));
}
const oneMaterialDto = async (row: ReferenceMaterial, t?: Transaction) => (await materialDtos([row], t))[0]!;

/** The audit view of a material: acceptedBy as the person's name, the rest as in the DTO. */
const materialView = (d: MaterialDto) => ({ ...auditView(d, ['acceptedBy']), acceptedBy: d.acceptedBy ? d.acceptedBy.fullName : null });

const MATERIAL_SORT: Record<MaterialListQuery['sort'], string> = {
  name: 'name',
  lot: 'lot',
  grade: 'grade',
  producer: 'producer',
  casNumber: 'cas_number',
  receivedOn: 'received_on',
  expiresOn: 'expires_on',
  status: 'status',
  updatedAt: 'updated_at',
};
const MATERIAL_SEARCH = ['name', 'formula', 'lot', 'producer', 'catalogue_number', 'cas_number', 'certificate_number', 'analytes'];

export async function listMaterials(query: MaterialListQuery): Promise<Paged<MaterialDto>> {
  const where: WhereOptions[] = searchCondition(ReferenceMaterial, MATERIAL_SEARCH, query.search);
  if (query.status) where.push({ status: query.status });
  if (query.grade) where.push({ grade: query.grade });
  if (query.usable) {
    const today = await labToday();
    where.push({ status: 'accepted' }, { [Op.or]: [{ expiresOn: null }, { expiresOn: { [Op.gte]: today } }] });
  }
  return pageOf(ReferenceMaterial, where, orderBy(MATERIAL_SORT[query.sort], query.dir), query, (rows) => materialDtos(rows));
}

export async function getMaterial(id: number): Promise<MaterialDto> {
  return oneMaterialDto(await loadOr404(ReferenceMaterial, id, 'Reference material'));
}

function materialAttributes(m: MaterialCreate) {
  return {
    name: m.name,
    formula: m.formula,
    analytes: m.analytes,
    casNumber: m.casNumber ?? null,
    grade: m.grade,
    producer: m.producer,
    catalogueNumber: m.catalogueNumber ?? null,
    lot: m.lot,
    certificateNumber: m.certificateNumber ?? null,
    purityValue: m.purity.value,
    purityExpandedUncertainty: m.purity.expandedUncertainty ?? null,
    purityK: m.purity.k ?? null,
    purityStandardUncertainty: m.purity.standardUncertainty ?? null,
    purityBasis: m.purity.basis,
    densityValue: m.densityGPerMl ?? null,
    receivedOn: m.receivedOn ?? null,
    openedOn: m.openedOn ?? null,
    expiresOn: m.expiresOn ?? null,
    storage: m.storage ?? null,
    ghsHazardStatements: m.ghsHazardStatements,
    ghsPictograms: m.ghsPictograms,
    status: m.status,
  };
}

/** The same lot of the same material from the same producer is registered once. */
async function assertLotFree(m: { name: string; lot: string; producer: string }, exceptId: number | null, transaction: Transaction) {
  const sequelize = ReferenceMaterial.sequelize!;
  const lower = (col: string, v: string) => sequelize.where(sequelize.fn('lower', sequelize.col(col)), v.toLowerCase());
  const clash = await ReferenceMaterial.findOne({
    where: {
      [Op.and]: [lower('name', m.name), lower('lot', m.lot), lower('producer', m.producer), ...(exceptId ? [{ id: { [Op.ne]: exceptId } }] : [])],
    } as WhereOptions,
    transaction,
  });
  if (clash) {
    throw AppError.conflict(`Lot ${m.lot} of ${m.name} from ${m.producer} is already registered`, {
      lot: `Lot ${m.lot} of this material is already registered (id ${clash.id})`,
    });
  }
}

export async function createMaterial(input: MaterialCreate, actor: Actor): Promise<MaterialDto> {
  return writeTransaction(async (transaction) => {
    await assertLotFree(input, null, transaction);
    const accepted = input.status === 'accepted';
    const row = await ReferenceMaterial.create(
      { ...materialAttributes(input), acceptedById: accepted ? actor.id : null, acceptedAt: accepted ? new Date().toISOString() : null },
      { transaction },
    );
    const dto = await oneMaterialDto(row, transaction);
    await audited(transaction, actor, 'reference_material', 'create', {}, dto, materialView);
    return dto;
  });
}

/** The create-schema input equivalent of a stored material (for re-validating a PATCH). */
function materialAsInput(d: MaterialDto) {
  const { id: _id, acceptedBy: _a, acceptedAt: _b, retiredAt: _c, retiredReason: _d, createdAt: _e, updatedAt: _f, ...rest } = d;
  return rest;
}

export async function updateMaterial(id: number, input: MaterialUpdate, actor: Actor): Promise<MaterialDto> {
  return writeTransaction(async (transaction) => {
    const row = await loadOr404(ReferenceMaterial, id, 'Reference material', transaction);
    refuseRetired(row.status, 'reference material');
    const before = await oneMaterialDto(row, transaction);
    const current = materialAsInput(before);
    const patch = given(input);
    const merged = checkMerged<MaterialCreate>(materialCreateInputSchema, {
      ...current,
      ...patch,
      purity: { ...current.purity, ...given(input.purity) },
    });
    if (patch.name !== undefined || patch.lot !== undefined || patch.producer !== undefined) await assertLotFree(merged, id, transaction);

    row.set(materialAttributes(merged));
    if (before.status !== 'accepted' && merged.status === 'accepted') {
      row.acceptedById = actor.id;
      row.acceptedAt = new Date().toISOString();
    } else if (before.status === 'accepted' && merged.status === 'quarantined') {
      row.acceptedById = null;
      row.acceptedAt = null;
    }
    const users = await usersById([row.acceptedById], transaction);
    if (!diffFields(materialView(before), materialView(materialDto(row, users))).length) return before;
    await row.save({ transaction });
    const after = await oneMaterialDto(row, transaction);
    await audited(transaction, actor, 'reference_material', 'update', materialView(before), after, materialView);
    return after;
  });
}

// -------------------------------------------------------------------------------------------- balances

export function balanceDto(b: Balance): BalanceDto {
  return {
    id: b.id,
    identifier: b.identifier,
    description: b.description,
    location: b.location,
    capacityG: b.capacityG,
    readabilityMg: b.readabilityMg,
    minWeightMg: b.minWeightMg,
    minWeightDeterminedOn: b.minWeightDeterminedOn,
    repeatabilitySdMg: b.repeatabilitySdMg,
    minWeightSafetyFactor: b.minWeightSafetyFactor,
    calibratedOn: b.calibratedOn,
    calibrationDueOn: b.calibrationDueOn,
    calibrationUncertaintyMg: b.calibrationUncertaintyMg,
    calibrationUncertaintyK: b.calibrationUncertaintyK,
    weightDensityGPerMl: b.weightDensity,
    minWeightReadabilityMg: b.minWeightReadabilityMg ?? null,
    minWeightComputed: Boolean(b.minWeightComputed),
    status: b.status,
    outputShape: b.outputShape ?? 'auto',
    printCommand: b.printCommand ?? null,
    printedId: b.printedId ?? null,
    serialBaud: b.serialBaud ?? 9600,
    serialDataBits: b.serialDataBits ?? 8,
    serialParity: b.serialParity ?? 'none',
    serialStopBits: b.serialStopBits ?? 1,
    serialLineEnding: b.serialLineEnding ?? 'crlf',
    retiredAt: b.retiredAt ?? null,
    retiredReason: b.retiredReason ?? null,
    createdAt: b.createdAt,
    updatedAt: b.updatedAt,
  };
}
const balanceView = (d: BalanceDto) => auditView(d);

const BALANCE_SORT: Record<BalanceListQuery['sort'], string> = {
  identifier: 'identifier',
  description: 'description',
  location: 'location',
  calibratedOn: 'calibrated_on',
  calibrationDueOn: 'calibration_due_on',
  status: 'status',
  updatedAt: 'updated_at',
};
const BALANCE_SEARCH = ['identifier', 'description', 'location'];

export async function listBalances(query: BalanceListQuery): Promise<Paged<BalanceDto>> {
  const where: WhereOptions[] = searchCondition(Balance, BALANCE_SEARCH, query.search);
  if (query.status) where.push({ status: query.status });
  if (query.usable) {
    // In service and calibrated: a balance without a due date is not usable (gates: calibration_due_unknown).
    where.push({ status: 'in_service' }, { calibrationDueOn: { [Op.gte]: await labToday() } });
  }
  return pageOf(Balance, where, orderBy(BALANCE_SORT[query.sort], query.dir), query, (rows) => rows.map(balanceDto));
}

export async function getBalance(id: number): Promise<BalanceDto> {
  return balanceDto(await loadOr404(Balance, id, 'Balance'));
}

function balanceAttributes(b: BalanceCreate) {
  return {
    identifier: b.identifier,
    description: b.description,
    location: b.location ?? null,
    capacityG: b.capacityG,
    readabilityMg: b.readabilityMg,
    minWeightMg: b.minWeightMg ?? null,
    minWeightDeterminedOn: b.minWeightDeterminedOn ?? null,
    repeatabilitySdMg: b.repeatabilitySdMg ?? null,
    minWeightSafetyFactor: b.minWeightSafetyFactor ?? null,
    calibratedOn: b.calibratedOn ?? null,
    calibrationDueOn: b.calibrationDueOn ?? null,
    calibrationUncertaintyMg: b.calibrationUncertaintyMg ?? null,
    calibrationUncertaintyK: b.calibrationUncertaintyK ?? null,
    weightDensity: b.weightDensityGPerMl,
    status: b.status,
    outputShape: b.outputShape,
    printCommand: b.printCommand ?? null,
    printedId: b.printedId ?? null,
    serialBaud: b.serialBaud,
    serialDataBits: b.serialDataBits,
    serialParity: b.serialParity,
    serialStopBits: b.serialStopBits,
    serialLineEnding: b.serialLineEnding,
  };
}

/**
 * Minimum weight. Entered → kept as entered (computed = false). Not entered but s and d known →
 * USP <41>: m_min = 2000 · max(s, 0.41·d) · SF, stored with s, d, SF (1 when not given) and the date
 * (the one given, else today), computed = true. Neither → no minimum weight.
 */
async function withMinimumWeight(b: BalanceCreate, recompute: boolean) {
  const attrs = { ...balanceAttributes(b), minWeightReadabilityMg: b.readabilityMg as string | null, minWeightComputed: false };
  if (b.minWeightMg != null) return attrs;
  if (!recompute || b.repeatabilitySdMg == null) return { ...attrs, minWeightReadabilityMg: null };
  const safetyFactor = b.minWeightSafetyFactor ?? '1';
  const result = uspMinimumWeight({ repeatabilitySd: b.repeatabilitySdMg, readability: b.readabilityMg, safetyFactor });
  return {
    ...attrs,
    minWeightMg: result.minimumWeight.toFixed(),
    minWeightSafetyFactor: safetyFactor,
    minWeightDeterminedOn: b.minWeightDeterminedOn ?? (await labToday()),
    minWeightComputed: true,
  };
}

export async function createBalance(input: BalanceCreate, actor: Actor): Promise<BalanceDto> {
  return writeTransaction(async (transaction) => {
    await assertIdentifierFree(Balance, input.identifier, null, transaction);
    const row = await Balance.create(await withMinimumWeight(input, true), { transaction });
    const dto = balanceDto(row);
    await audited(transaction, actor, 'balance', 'create', {}, dto, balanceView);
    return dto;
  });
}

function balanceAsInput(d: BalanceDto) {
  const { id: _i, minWeightReadabilityMg: _r, minWeightComputed: _c, retiredAt: _a, retiredReason: _b, createdAt: _e, updatedAt: _f, ...rest } = d;
  return rest;
}

export async function updateBalance(id: number, input: BalanceUpdate, actor: Actor): Promise<BalanceDto> {
  return writeTransaction(async (transaction) => {
    const row = await loadOr404(Balance, id, 'Balance', transaction);
    refuseRetired(row.status, 'balance');
    const before = balanceDto(row);
    const patch = given(input);
    const current = balanceAsInput(before);
    // A computed minimum weight follows its inputs: drop it so it is recomputed from the new s, d or SF.
    const inputsChanged = ['repeatabilitySdMg', 'readabilityMg', 'minWeightSafetyFactor'].some((k) => k in patch);
    const recompute = patch.minWeightMg === null || (patch.minWeightMg === undefined && (before.minWeightComputed || before.minWeightMg === null) && inputsChanged);
    if (recompute && patch.minWeightMg === undefined) current.minWeightMg = null;
    if (recompute && patch.minWeightDeterminedOn === undefined && before.minWeightComputed) current.minWeightDeterminedOn = null;
    const merged = checkMerged<BalanceCreate>(balanceCreateInputSchema, { ...current, ...patch });
    if (patch.identifier !== undefined) await assertIdentifierFree(Balance, merged.identifier, id, transaction);

    const attrs = await withMinimumWeight(merged, recompute);
    if (!recompute && patch.minWeightMg === undefined) {
      // Minimum weight untouched: keep its provenance (d at the time, computed or entered).
      Object.assign(attrs, { minWeightReadabilityMg: before.minWeightReadabilityMg, minWeightComputed: before.minWeightComputed });
    }
    row.set(attrs);
    if (!diffFields(balanceView(before), balanceView(balanceDto(row))).length) return before;
    await row.save({ transaction });
    const after = balanceDto(row);
    await audited(transaction, actor, 'balance', 'update', balanceView(before), after, balanceView);
    return after;
  });
}

// -------------------------------------------------------------------------------------- volumetric ware

export function wareDto(w: VolumetricWare): WareDto {
  return {
    id: w.id,
    identifier: w.identifier,
    kind: w.kind,
    nominalVolumeMl: w.nominalVolumeMl,
    class: w.wareClass,
    toleranceMl: w.toleranceMl,
    material: w.material,
    status: w.status,
    retiredAt: w.retiredAt ?? null,
    retiredReason: w.retiredReason ?? null,
    createdAt: w.createdAt,
    updatedAt: w.updatedAt,
  };
}
const wareView = (d: WareDto) => auditView(d);

/** Nominal volume is TEXT; it sorts by value through the expression index volumetric_ware_nominal_volume. */
const WARE_SORT: Record<WareListQuery['sort'], string | ReturnType<typeof literal>> = {
  identifier: 'identifier',
  kind: 'kind',
  nominalVolumeMl: literal('CAST(nominal_volume_ml AS REAL)'),
  class: 'class',
  material: 'material',
  status: 'status',
  updatedAt: 'updated_at',
};
const WARE_SEARCH = ['identifier', 'kind', 'nominal_volume_ml', 'material'];

export async function listVolumetricWare(query: WareListQuery): Promise<Paged<WareDto>> {
  const where: WhereOptions[] = searchCondition(VolumetricWare, WARE_SEARCH, query.search);
  if (query.status) where.push({ status: query.status });
  if (query.kind) where.push({ kind: query.kind });
  if (query.usable) where.push({ status: 'in_service' });
  const page = await pageOf(VolumetricWare, where, orderBy(WARE_SORT[query.sort], query.dir), query, (rows) => rows.map(wareDto));
  // a flask that still holds an open preparation's solution is marked with it (flask-occupancy.ts), for the pickers
  if (page.items.some((w) => w.kind === 'volumetric_flask')) {
    const held = await flasksHoldingSolutions(await labToday());
    for (const w of page.items) if (w.kind === 'volumetric_flask') w.holds = held.get(w.id) ?? null;
  }
  return page;
}

export async function getVolumetricWare(id: number): Promise<WareDto> {
  return wareDto(await loadOr404(VolumetricWare, id, 'Volumetric ware'));
}

function wareAttributes(w: WareCreate) {
  return {
    identifier: w.identifier,
    kind: w.kind,
    nominalVolumeMl: w.nominalVolumeMl,
    wareClass: w.class,
    toleranceMl: w.toleranceMl ?? null,
    material: w.material ?? null,
    status: w.status,
  };
}

export async function createVolumetricWare(input: WareCreate, actor: Actor): Promise<WareDto> {
  return writeTransaction(async (transaction) => {
    await assertIdentifierFree(VolumetricWare, input.identifier, null, transaction);
    const row = await VolumetricWare.create(wareAttributes(input), { transaction });
    const dto = wareDto(row);
    await audited(transaction, actor, 'volumetric_ware', 'create', {}, dto, wareView);
    return dto;
  });
}

export async function updateVolumetricWare(id: number, input: WareUpdate, actor: Actor): Promise<WareDto> {
  return writeTransaction(async (transaction) => {
    const row = await loadOr404(VolumetricWare, id, 'Volumetric ware', transaction);
    refuseRetired(row.status, 'item of volumetric ware');
    const before = wareDto(row);
    const { id: _i, retiredAt: _a, retiredReason: _b, createdAt: _c, updatedAt: _d, ...current } = before;
    const patch = given(input);
    const merged = checkMerged<WareCreate>(wareCreateInputSchema, { ...current, ...patch });
    if (patch.identifier !== undefined) await assertIdentifierFree(VolumetricWare, merged.identifier, id, transaction);
    row.set(wareAttributes(merged));
    if (!diffFields(wareView(before), wareView(wareDto(row))).length) return before;
    await row.save({ transaction });
    const after = wareDto(row);
    await audited(transaction, actor, 'volumetric_ware', 'update', wareView(before), after, wareView);
    return after;
  });
}

// --------------------------------------------------------------------------------------------- solvents

export function solventDto(s: Solvent): SolventDto {
  return {
    id: s.id,
    name: s.name,
    grade: s.grade,
    lot: s.lot,
    density20cGPerMl: s.density20c,
    expansionCoefficientPerK: s.expansionCoefficient,
    expiresOn: s.expiresOn,
    status: s.status,
    retiredAt: s.retiredAt ?? null,
    retiredReason: s.retiredReason ?? null,
    createdAt: s.createdAt,
    updatedAt: s.updatedAt,
  };
}
const solventView = (d: SolventDto) => auditView(d);

const SOLVENT_SORT: Record<SolventListQuery['sort'], string> = {
  name: 'name',
  grade: 'grade',
  lot: 'lot',
  expiresOn: 'expires_on',
  status: 'status',
  updatedAt: 'updated_at',
};
const SOLVENT_SEARCH = ['name', 'grade', 'lot'];

export async function listSolvents(query: SolventListQuery): Promise<Paged<SolventDto>> {
  const where: WhereOptions[] = searchCondition(Solvent, SOLVENT_SEARCH, query.search);
  if (query.status) where.push({ status: query.status });
  if (query.usable) {
    const today = await labToday();
    where.push({ status: 'accepted' }, { [Op.or]: [{ expiresOn: null }, { expiresOn: { [Op.gte]: today } }] });
  }
  return pageOf(Solvent, where, orderBy(SOLVENT_SORT[query.sort], query.dir), query, (rows) => rows.map(solventDto));
}

export async function getSolvent(id: number): Promise<SolventDto> {
  return solventDto(await loadOr404(Solvent, id, 'Solvent'));
}

function solventAttributes(s: SolventCreate) {
  return {
    name: s.name,
    grade: s.grade ?? null,
    lot: s.lot,
    density20c: s.density20cGPerMl ?? null,
    expansionCoefficient: s.expansionCoefficientPerK ?? null,
    expiresOn: s.expiresOn ?? null,
    status: s.status,
  };
}

export async function createSolvent(input: SolventCreate, actor: Actor): Promise<SolventDto> {
  return writeTransaction(async (transaction) => {
    const row = await Solvent.create(solventAttributes(input), { transaction });
    const dto = solventDto(row);
    await audited(transaction, actor, 'solvent', 'create', {}, dto, solventView);
    return dto;
  });
}

export async function updateSolvent(id: number, input: SolventUpdate, actor: Actor): Promise<SolventDto> {
  return writeTransaction(async (transaction) => {
    const row = await loadOr404(Solvent, id, 'Solvent', transaction);
    refuseRetired(row.status, 'solvent');
    const before = solventDto(row);
    const { id: _i, retiredAt: _a, retiredReason: _b, createdAt: _c, updatedAt: _d, ...current } = before;
    const merged = checkMerged<SolventCreate>(solventCreateInputSchema, { ...current, ...given(input) });
    row.set(solventAttributes(merged));
    if (!diffFields(solventView(before), solventView(solventDto(row))).length) return before;
    await row.save({ transaction });
    const after = solventDto(row);
    await audited(transaction, actor, 'solvent', 'update', solventView(before), after, solventView);
    return after;
  });
}

// ------------------------------------------------------------------------------------------- retiring

type RetireTarget = {
  model: ModelStatic<Model & { status: string; retiredAt?: string | null; retiredReason?: string | null }>;
  what: string;
  entity: string;
  toDto: (row: never, t: Transaction) => Promise<{ id: number }> | { id: number };
  view: (d: never) => Record<string, unknown>;
};

const RETIRE: Record<'material' | 'balance' | 'ware' | 'solvent', RetireTarget> = {
  material: { model: ReferenceMaterial as never, what: 'Reference material', entity: 'reference_material', toDto: oneMaterialDto as never, view: materialView as never },
  balance: { model: Balance as never, what: 'Balance', entity: 'balance', toDto: balanceDto as never, view: balanceView as never },
  ware: { model: VolumetricWare as never, what: 'Volumetric ware', entity: 'volumetric_ware', toDto: wareDto as never, view: wareView as never },
  solvent: { model: Solvent as never, what: 'Solvent', entity: 'solvent', toDto: solventDto as never, view: solventView as never },
};

/** Status → retired, with when and why; audited with the reason. Never deleted. */
async function retire<D extends { id: number }>(kind: keyof typeof RETIRE, id: number, reason: string, actor: Actor): Promise<D> {
  const target = RETIRE[kind];
  return writeTransaction(async (transaction) => {
    const row = await loadOr404(target.model, id, target.what, transaction);
    if (row.status === 'retired') {
      throw new AppError('conflict', 409, `${target.what} ${id} is already retired`, { fields: { status: 'Already retired' } });
    }
    const before = target.view((await target.toDto(row as never, transaction)) as never);
    row.set({ status: 'retired', retiredAt: new Date().toISOString(), retiredReason: reason } as never);
    await row.save({ transaction });
    const after = (await target.toDto(row as never, transaction)) as D;
    await audited(transaction, actor, target.entity, 'retire', before, after, target.view as never, reason);
    return after;
  });
}

export const retireMaterial = (id: number, reason: string, actor: Actor) => retire<MaterialDto>('material', id, reason, actor);
export const retireBalance = (id: number, reason: string, actor: Actor) => retire<BalanceDto>('balance', id, reason, actor);
export const retireVolumetricWare = (id: number, reason: string, actor: Actor) => retire<WareDto>('ware', id, reason, actor);
export const retireSolvent = (id: number, reason: string, actor: Actor) => retire<SolventDto>('solvent', id, reason, actor);
