/**
 * The preparation journey: plan (with gates), weigh, make up to volume, recompute, keep for good.
 * REQUIREMENTS TR-01 (server-issued identifiers, never reused), TR-08 (original observations stored at once,
 * verbatim, append-only), TR-09 (the server recomputes from stored values and stores the formula version),
 * AT-01 (every write audited in the same transaction), and principle 6 (equipment snapshotted at use).
 * Inventory rows are read through the models directly; snapshots freeze them as DTOs.
 */
import { Op, QueryTypes, literal, type WhereOptions } from 'sequelize';
import { CalcError, convertVolume, D } from '../../shared/calc/index.ts';
import { capturesOf, checkedCaptures, captureSummary } from './reading-capture.ts';
import type { StoredCapture } from '../../shared/balance/capture.ts';
import { checkReadingDigits, checkReadingRange, computeExpiry, dayNumber, evaluateGates, formatPreparationId, isInWindow, netFromDifference, parsePreparationId, type GateBalance } from '../../shared/prep/index.ts';
import { evaluateFlaskGates, evaluateMaterialDensityGate, evaluateWareCheckGate, type PlanFlask } from '../../shared/prep/plan-gates.ts';
import { failedCheckOf } from './volume-check-gate.ts';
import type { Balance as BalanceDto, ReferenceMaterial as MaterialDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type {
  ConditionsInput,
  ConditionsUsed,
  CreatePreparationInput,
  Gate,
  ListPreparationsQuery,
  MakeUp as MakeUpDto,
  MakeUpInput,
  PlanInput,
  PreparationDetail,
  PreparationList,
  PreparationPreview,
  PreparationStage,
  PreparationSummary,
  Weighing as WeighingDto,
  WeighingInput,
} from '../../shared/schemas/preparations.ts';
import { DEFAULT_STABILITY_BASIS, DEFAULT_STABILITY_DAYS, type LabSettings } from '../../shared/schemas/settings.ts';
import { Balance, DilutionAliquot, GravimetricReading, MakeUp, Preparation, PreparationEvent, ReferenceMaterial, Solvent, User, VolumetricWare, Weighing } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { calcVersionFor, computeResult, flaskVolumeUncertainty, planNumbers, readingInMg, runCore, coreRequest, type CoreInputs } from './preparation-calc.ts';
import { preparationHazards } from './preparation-hazards.ts';
import { labDate as sharedLabDate } from '../../shared/prep/lab-time.ts';
import { assertFlaskFree } from './flask-occupancy.ts';
import { balanceSnapshot, materialSnapshot, solventSnapshot, wareSnapshot } from './preparation-snapshots.ts';
import { getSettings } from './settings.service.ts';
import { checkChange, recordAmendment, shownColumns, signatureView } from './signatures.service.ts';
import { SEALED_STATUSES, sealStates, showSealBroken } from './record-integrity.ts';
import { dataEntryMode } from './preparation-status.ts';
import { shownStatus } from '../../shared/schemas/expiry.ts';
import { expirySection, statusWhere } from './expiry-extension.service.ts';
import { assertWeighable, lineageExpiry, lineageRow, lineageSection, storeDilutionResult } from './lineage-view.ts';
import { withCalibratedVolume } from './calibrated-volume.ts';
import { isGravimetricPlan } from './gravimetric-calc.ts';

export interface Actor {
  id: number;
  fullName: string;
}

/** `now` exists for the demo seed (fixed dates); routes always use the server clock. */
export interface WriteOptions {
  now?: Date;
  /** consecutive password failures that lock the account (config.lockoutThreshold; default 5) */
  lockoutThreshold?: number;
}

/** 422 when a blocking gate fires; the route sends `{ error: { code, message, gates } }`. */
export class GateBlockedError extends AppError {
  readonly gates: Gate[];
  constructor(gates: Gate[]) {
    const blocks = gates.filter((g) => g.severity === 'block');
    super('gate_blocked', 422, blocks.length === 1 ? blocks[0]!.message : `${blocks.length} checks block this preparation: ${blocks.map((g) => g.message).join('; ')}`);
    this.gates = gates;
  }
}

// ------------------------------------------------------------------ time

/** The lab's calendar date of an instant (YYYY-MM-DD in settings.timeZone): the one lab-date formatter, shared/prep/lab-time.ts. */
export function labDate(at: Date, timeZone: string): string {
  return sharedLabDate(at, timeZone);
}

function resolveConditions(input: ConditionsInput, settings: LabSettings, now: Date, field = 'conditions'): ConditionsUsed {
  if (input.source === 'lab-default') {
    return { source: 'lab-default', ...settings.defaultRoomConditions, measuredAt: now.toISOString() };
  }
  let measuredAt = now.toISOString();
  if (input.measuredAt) {
    const at = new Date(input.measuredAt);
    if (at.getTime() > now.getTime() + 5 * 60_000) {
      throw AppError.validation('The conditions cannot be measured in the future', { [`${field}.measuredAt`]: `Enter a time no later than now (${now.toISOString()})` });
    }
    measuredAt = at.toISOString();
  }
  return { source: 'measured', temperatureC: input.temperatureC, pressureHPa: input.pressureHPa, relativeHumidityPct: input.relativeHumidityPct, measuredAt };
}

// ------------------------------------------------------------------ planning

export const gateBalance = (b: BalanceDto): GateBalance => ({
  identifier: b.identifier,
  status: b.status as GateBalance['status'],
  ...(b.calibrationDueOn ? { calibrationDueOn: b.calibrationDueOn } : {}),
  ...(b.minWeightMg ? { minWeightMg: b.minWeightMg } : {}),
  readabilityMg: b.readabilityMg,
});

const planFlask = (w: WareDto): PlanFlask => ({ identifier: w.identifier, kind: w.kind, nominalVolumeMl: w.nominalVolumeMl, class: w.class, status: w.status });

interface PlanContext {
  material: MaterialDto;
  balance: BalanceDto;
  flask: WareDto | null;
  volume: { value: string; unit: string };
  volumeMl: string;
  conditions: ConditionsUsed;
  settings: LabSettings;
  today: string;
  otherBalances: BalanceDto[];
  flasks: WareDto[];
}

async function loadPlanContext(input: PlanInput, now: Date): Promise<PlanContext> {
  const settings = await getSettings();
  const fields: Record<string, string> = {};
  const [m, b, f] = await Promise.all([
    ReferenceMaterial.findByPk(input.materialId),
    Balance.findByPk(input.balanceId),
    input.flaskId !== undefined ? VolumetricWare.findByPk(input.flaskId) : Promise.resolve(null),
  ]);
  if (!m) fields.materialId = `No reference material with id ${input.materialId} is registered`;
  if (!b) fields.balanceId = `No balance with id ${input.balanceId} is registered`;
  if (input.flaskId !== undefined && !f) fields.flaskId = `No volumetric ware with id ${input.flaskId} is registered`;
  if (m) {
    const known = [m.formula, ...m.analytes.map((a) => a.formula)];
    if (!known.includes(input.analyteFormula)) {
      fields.analyteFormula = `${input.analyteFormula} is not an analyte of ${m.name}; choose one of ${known.join(', ')}`;
    }
  }
  if (Object.keys(fields).length) throw AppError.validation(Object.keys(fields).length === 1 ? Object.values(fields)[0]! : 'Some choices are not valid', fields);
  const today = labDate(now, settings.timeZone);
  // the flask's calibrated volume when the lab allows it (frozen in the plan's snapshot; calibrated-volume.ts)
  const flask = f ? await withCalibratedVolume(wareSnapshot(f), f.nominalVolumeMl, settings, today) : null;
  const volume = flask ? { value: flask.nominalVolumeMl, unit: 'mL' } : input.volume!;
  const [balances, ware] = await Promise.all([Balance.findAll({ order: [['identifier', 'ASC']] }), VolumetricWare.findAll({ where: { kind: 'volumetric_flask' }, order: [['identifier', 'ASC']] })]);
  return {
    material: await materialSnapshot(m!),
    balance: balanceSnapshot(b!),
    flask,
    volume,
    volumeMl: convertVolume(volume.value, volume.unit, 'mL').toString(),
    conditions: resolveConditions(input.conditions, settings, now),
    settings,
    today,
    otherBalances: balances.map(balanceSnapshot),
    flasks: ware.map(wareSnapshot),
  };
}

interface Evaluated {
  ctx: PlanContext;
  numbers: ReturnType<typeof planNumbers>;
  gates: Gate[];
}

async function evaluatePlan(input: PlanInput, now: Date): Promise<Evaluated> {
  const ctx = await loadPlanContext(input, now);
  const densityGate = evaluateMaterialDensityGate(ctx.material);
  if (densityGate.length) throw new GateBlockedError(densityGate);
  const vu = ctx.flask ? flaskVolumeUncertainty(ctx.flask) : undefined;
  const core: CoreInputs = {
    material: ctx.material,
    analyteFormula: input.analyteFormula,
    target: input.target,
    volume: { ...(vu && ctx.flask?.calibratedVolume ? { value: vu.volumeMl, unit: 'mL' } : ctx.volume), ...(vu?.standardUncertainty ? { standardUncertainty: vu.standardUncertainty } : {}) },
    balance: ctx.balance,
    air: ctx.conditions,
    rounding: ctx.settings.roundingRule,
  };
  const numbers = planNumbers(core, ctx.settings.readingWindowPct, { kind: 'plan', usesFlask: ctx.flask !== null });
  if (vu?.label) {
    // the planned budget names the check the flask's volume comes from, as the result will
    numbers.calc.planned.budget = numbers.calc.planned.budget.map((r) => (r.input === 'volume' ? { ...r, label: vu.label! } : r));
  }
  const flaskOptions = [...new Set(ctx.flasks.filter((w) => w.status === 'in_service').map((w) => w.nominalVolumeMl))].sort((a, b) => new D(a).cmp(b));
  const coreGates = evaluateGates({
    today: ctx.today,
    plannedReadingMg: numbers.plannedReadingMg,
    balance: gateBalance(ctx.balance),
    otherBalances: ctx.otherBalances.filter((b) => b.status === 'in_service').map(gateBalance),
    material: { name: ctx.material.name, status: ctx.material.status, ...(ctx.material.expiresOn ? { expiresOn: ctx.material.expiresOn } : {}), purityValue: ctx.material.purity.value },
    volumeMl: ctx.volumeMl,
    flaskOptions,
  });
  const gates: Gate[] = [...coreGates, ...evaluateFlaskGates({ ...(ctx.flask ? { flask: planFlask(ctx.flask) } : {}), volumeMl: ctx.volumeMl, flasks: ctx.flasks.map(planFlask) })];
  if (ctx.flask) gates.push(...(evaluateWareCheckGate(ctx.flask, await failedCheckOf(ctx.flask.id)) as Gate[]));
  return { ctx, numbers, gates };
}

function previewOf(e: Evaluated): PreparationPreview {
  return {
    calc: e.numbers.calc,
    targetReading: e.numbers.targetReading,
    window: e.numbers.window,
    expectedUncertainty: e.numbers.expectedUncertainty,
    gates: e.gates,
    conditionsUsed: e.ctx.conditions,
    snapshot: { material: e.ctx.material, balance: e.ctx.balance, flask: e.ctx.flask },
  };
}

/** POST /api/preparations/preview: the numbers and the gates, nothing stored. */
export async function previewPreparation(input: PlanInput, opts: WriteOptions = {}): Promise<PreparationPreview> {
  return previewOf(await evaluatePlan(input, opts.now ?? new Date()));
}

function expiryOf(material: MaterialDto, settings: LabSettings, preparedOn: string) {
  return computeExpiry({
    preparedOn,
    stabilityDays: settings.defaultStabilityDays ?? DEFAULT_STABILITY_DAYS,
    stabilityBasis: settings.defaultStabilityBasis ?? DEFAULT_STABILITY_BASIS,
    ...(material.expiresOn ? { materialExpiresOn: material.expiresOn } : {}),
    materialIdentifier: `${material.name} lot ${material.lot}`,
  });
}

/** Next number for prefix + year, inside the caller's write transaction (issued once, never reused). */
async function nextSequence(prefix: string, year: number, transaction: import('sequelize').Transaction): Promise<number> {
  const sequelize = Preparation.sequelize!;
  await sequelize.query(
    `INSERT INTO preparation_sequences (prefix, year, last_seq) VALUES (:prefix, :year, 1)
     ON CONFLICT (prefix, year) DO UPDATE SET last_seq = last_seq + 1`,
    { replacements: { prefix, year }, transaction },
  );
  const rows = await sequelize.query<{ last_seq: number }>('SELECT last_seq FROM preparation_sequences WHERE prefix = :prefix AND year = :year', {
    replacements: { prefix, year },
    type: QueryTypes.SELECT,
    transaction,
  });
  return Number(rows[0]!.last_seq);
}

/** POST /api/preparations: 422 gate_blocked when a blocking gate fires; else the planned record. */
export async function createPreparation(input: CreatePreparationInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetail> {
  const now = opts.now ?? new Date();
  const e = await evaluatePlan(input, now);
  if (e.gates.some((g) => g.severity === 'block')) throw new GateBlockedError(e.gates);
  const { notes, ...plan } = input;
  const expiry = expiryOf(e.ctx.material, e.ctx.settings, e.ctx.today);
  const at = now.toISOString();
  const id = await writeTransaction(async (transaction) => {
    const year = Number(e.ctx.today.slice(0, 4));
    const seq = await nextSequence(e.ctx.settings.idPrefix, year, transaction);
    const identifier = formatPreparationId(e.ctx.settings.idPrefix, year, seq);
    const prep = await Preparation.create(
      {
        identifier,
        status: 'planned',
        version: 1,
        materialId: e.ctx.material.id,
        analyteFormula: input.analyteFormula,
        targetValue: input.target.value,
        targetUnit: input.target.unit,
        volumeValue: e.ctx.volume.value,
        volumeUnit: e.ctx.volume.unit,
        flaskId: e.ctx.flask?.id ?? null,
        balanceId: e.ctx.balance.id,
        inputs: plan as PlanInput,
        notes: notes ? notes : null,
        conditionsUsed: e.ctx.conditions,
        snapshotMaterial: e.ctx.material,
        snapshotBalance: e.ctx.balance,
        snapshotFlask: e.ctx.flask,
        plan: {
          targetReading: e.numbers.targetReading,
          window: e.numbers.window,
          trueMass: e.numbers.trueMass,
          buoyancyFactor: e.numbers.calc.buoyancyFactor,
          gravimetricFactor: e.numbers.calc.gravimetricFactor,
          airDensity: e.numbers.calc.airDensity.value,
          expectedUncertainty: e.numbers.expectedUncertainty,
          calc: e.numbers.calc,
          calcRequest: e.numbers.calcRequest,
          calcVersion: calcVersionFor(e.ctx.flask),
        },
        gates: e.gates,
        result: null,
        concentrationDisplay: null,
        expiresOn: expiry.expiresOn,
        expiryReason: expiry.reason,
        createdOn: e.ctx.today,
        createdBy: actor.id,
        createdAt: at,
        updatedAt: at,
      },
      { transaction },
    );
    await PreparationEvent.create({ preparationId: prep.id, status: 'planned', note: notes ? notes : null, byId: actor.id, byName: actor.fullName, at }, { transaction });
    await recordAudit(
      {
        actor,
        action: 'plan',
        entity: 'preparation',
        entityId: prep.id,
        changes: diffFields(
          {},
          {
            identifier,
            status: 'planned',
            material: `${e.ctx.material.name} lot ${e.ctx.material.lot}`,
            analyteFormula: input.analyteFormula,
            target: `${input.target.value} ${input.target.unit}`,
            volume: `${e.ctx.volume.value} ${e.ctx.volume.unit}`,
            flask: e.ctx.flask?.identifier ?? null,
            balance: e.ctx.balance.identifier,
            targetReadingMg: e.numbers.targetReading.value,
            conditions: e.ctx.conditions,
            expiresOn: expiry.expiresOn,
            warnings: e.gates.map((g) => g.code),
          },
        ),
      },
      transaction,
    );
    return prep.id;
  });
  return getPreparation(String(id), actor.id);
}

// ------------------------------------------------------------------ reading

async function findPreparation(key: string): Promise<Preparation> {
  let prep: Preparation | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) prep = await Preparation.findByPk(Number(key));
  else if (parsePreparationId(key)) prep = await Preparation.findOne({ where: { identifier: key } });
  if (!prep) throw AppError.notFound(`Preparation ${key}`);
  return prep;
}

function stageOf(hasWeighing: boolean, hasMakeUp: boolean): PreparationStage {
  if (hasWeighing && hasMakeUp) return 'complete';
  if (hasMakeUp) return 'made_up';
  if (hasWeighing) return 'weighed';
  return 'planned';
}

async function usersById(ids: number[]): Promise<Map<number, User>> {
  const unique = [...new Set(ids)];
  if (!unique.length) return new Map();
  const rows = await User.findAll({ attributes: ['id', 'fullName', 'initials'], where: { id: unique } }); // names only, never the password hash
  return new Map(rows.map((u) => [u.id, u]));
}

function person(users: Map<number, User>, id: number) {
  const u = users.get(id);
  return { id, fullName: u?.fullName ?? `user ${id}` };
}

function summaryOf(p: Preparation, users: Map<number, User>, stage: PreparationStage, today: string): PreparationSummary {
  const u = users.get(p.createdBy);
  const s: PreparationSummary = {
    id: p.id,
    identifier: p.identifier,
    ...shownStatus(p.status, p.expiresOn, today), // a live record past its expiry shows as expired (expiry-extension.service)
    stage,
    materialName: p.snapshotMaterial.name,
    analyteFormula: p.analyteFormula,
    target: { value: p.targetValue, unit: p.targetUnit },
    volume: { value: p.volumeValue, unit: p.volumeUnit },
    createdBy: { id: p.createdBy, fullName: u?.fullName ?? `user ${p.createdBy}`, initials: u?.initials ?? '' },
    createdAt: p.createdAt,
    expiresOn: p.expiresOn,
  };
  if (p.concentrationDisplay) s.concentrationDisplay = p.concentrationDisplay;
  return s;
}

function weighingDto(w: Weighing, supersededBy: Map<number, number>, users: Map<number, User>): WeighingDto {
  const q = (value: string) => ({ value, unit: w.unit });
  const dto: WeighingDto = {
    id: w.id,
    mode: w.mode,
    net: { value: w.netMg, unit: 'mg' },
    captures: capturesOf(w.captures, w.mode === 'direct' ? ['reading'] : ['before', 'after']),
    balance: { id: w.balanceId, identifier: w.balanceSnapshot.identifier, snapshot: w.balanceSnapshot },
    conditions: w.conditions,
    airDensity: w.airDensity,
    inWindow: Boolean(w.inWindow),
    recordedBy: person(users, w.recordedBy),
    recordedAt: w.recordedAt,
  };
  if (w.reading !== null) dto.reading = q(w.reading);
  if (w.beforeReading !== null) dto.before = q(w.beforeReading);
  if (w.afterReading !== null) dto.after = q(w.afterReading);
  if (w.outOfWindowReason) dto.outOfWindowReason = w.outOfWindowReason;
  if (w.supersedesId !== null) dto.supersedesId = w.supersedesId;
  const by = supersededBy.get(w.id);
  if (by !== undefined) dto.supersededById = by;
  if (w.correctionReason) dto.correctionReason = w.correctionReason;
  return dto;
}

function makeUpDto(m: MakeUp, users: Map<number, User>): MakeUpDto {
  const dto: MakeUpDto = {
    id: m.id,
    flask: { id: m.flaskId, identifier: m.flaskIdentifier, snapshot: m.flaskSnapshot, substituted: Boolean(m.substituted) },
    solvent: { id: m.solventId, name: m.solventSnapshot.name, lot: m.solventLot, expansionCoefficientPerK: m.solventSnapshot.expansionCoefficientPerK, snapshot: m.solventSnapshot },
    solutionTemperatureC: m.solutionTemperatureC,
    applyTemperatureCorrection: Boolean(m.applyTemperatureCorrection),
    recordedBy: person(users, m.recordedBy),
    recordedAt: m.recordedAt,
  };
  if (m.correctionReason) dto.correctionReason = m.correctionReason;
  if (m.supersedesId !== null) dto.supersedesId = m.supersedesId;
  return dto;
}

/** The weighing that counts: the newest one that no other weighing supersedes. */
function activeWeighing(weighings: Weighing[]): Weighing | undefined {
  const superseded = new Set(weighings.map((w) => w.supersedesId).filter((x): x is number => x !== null));
  return weighings.filter((w) => !superseded.has(w.id)).at(-1);
}

async function detailOf(p: Preparation, viewerId?: number): Promise<PreparationDetail> {
  const settings = await getSettings();
  const today = labDate(new Date(), settings.timeZone);
  const [weighings, makeUps, events, aliquotCount] = await Promise.all([
    Weighing.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
    MakeUp.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
    PreparationEvent.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
    DilutionAliquot.count({ where: { preparationId: p.id } }), // a dilution's measured step is its aliquot (no weighing)
  ]);
  const readingCount = await GravimetricReading.count({ where: { preparationId: p.id } }); // a dilution by mass: both readings weigh and make up at once
  const users = await usersById([p.createdBy, ...weighings.map((w) => w.recordedBy), ...makeUps.map((m) => m.recordedBy), ...events.map((e) => e.byId)]);
  const supersededBy = new Map<number, number>();
  for (const w of weighings) if (w.supersedesId !== null) supersededBy.set(w.supersedesId, w.id);
  const latestMakeUp = makeUps.at(-1);
  const detail: PreparationDetail = {
    ...summaryOf(p, users, stageOf(weighings.length > 0 || aliquotCount > 0 || readingCount > 0, makeUps.length > 0 || readingCount > 0), today),
    version: p.version,
    inputs: p.inputs,
    conditionsUsed: p.conditionsUsed,
    snapshot: { material: p.snapshotMaterial, balance: p.snapshotBalance, flask: p.snapshotFlask },
    plan: {
      targetReading: p.plan.targetReading,
      window: p.plan.window,
      trueMass: p.plan.trueMass,
      buoyancyFactor: p.plan.buoyancyFactor,
      gravimetricFactor: p.plan.gravimetricFactor,
      airDensity: p.plan.airDensity,
      expectedUncertainty: p.plan.expectedUncertainty,
    },
    gates: p.gates,
    weighings: weighings.map((w) => weighingDto(w, supersededBy, users)),
    makeUpHistory: makeUps.slice(0, -1).map((m) => makeUpDto(m, users)),
    hazards: await preparationHazards(p, latestMakeUp ?? null),
    statusHistory: events.map((e) => ({ status: e.status, at: e.at, by: { id: e.byId, fullName: e.byName }, ...(e.note ? { note: e.note } : {}) })),
    expiry: { expiresOn: p.expiresOn, reason: p.expiryReason },
    ...(await signatureView(p, weighings, makeUps, viewerId)),
    ...(await lineageSection(p, settings)),
    ...(await expirySection(p, viewerId, today)),
  };
  if (p.notes) detail.notes = p.notes;
  if (latestMakeUp) detail.makeUp = makeUpDto(latestMakeUp, users);
  if (p.result) detail.result = p.result;
  return detail;
}

/** GET /api/preparations/:key (numeric id or identifier); canSign is computed for `viewerId`. */
export async function getPreparation(key: string, viewerId?: number): Promise<PreparationDetail> {
  return detailOf(await findPreparation(key), viewerId);
}

/** The columns a list row needs (summaryOf), besides the material name. */
const LIST_ATTRIBUTES = ['id', 'identifier', 'status', 'analyteFormula', 'targetValue', 'targetUnit', 'volumeValue', 'volumeUnit', 'concentrationDisplay', 'expiresOn', 'createdBy', 'createdAt'] as const;

const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** GET /api/preparations */
export async function listPreparations(q: ListPreparationsQuery, actor: Actor, opts: WriteOptions = {}): Promise<PreparationList> {
  const and: WhereOptions[] = [];
  const today = labDate(opts.now ?? new Date(), (await getSettings()).timeZone);
  if (q.mine) and.push({ createdBy: actor.id });
  if (q.today) and.push({ createdOn: today });
  if (q.status) and.push(statusWhere(q.status, today)); // by the shown status: 'expired' includes live records past expiry
  if (q.search) {
    const pattern = `%${likeEscape(q.search)}%`;
    const esc = Preparation.sequelize!.escape(pattern);
    // ESCAPE on every LIKE, so % and _ in the search are plain characters
    and.push({
      [Op.or]: [
        literal(`\`Preparation\`.\`identifier\` LIKE ${esc} ESCAPE '\\'`),
        literal(`\`Preparation\`.\`analyte_formula\` LIKE ${esc} ESCAPE '\\'`),
        literal(`json_extract(snapshot_material, '$.name') LIKE ${esc} ESCAPE '\\'`),
      ],
    } as WhereOptions);
  }
  const where = and.length ? { [Op.and]: and } : {};
  // One statement for the page: the summary's columns only (the large JSON stays on disk; the material snapshot is
  // cut to its name in SQL, summaryOf reads snapshotMaterial.name), the stage
  // (a dilution's aliquot stands for the weighing; a dilution by mass is weighed and made up in one step,
  // gravimetric_readings) and the creator's name and initials.
  const has = (table: string) => `EXISTS (SELECT 1 FROM ${table} x WHERE x.preparation_id = \`Preparation\`.\`id\`)`;
  const rows = await Preparation.findAll({
    attributes: [
      ...LIST_ATTRIBUTES,
      [literal("json_object('name', json_extract(snapshot_material, '$.name'))"), 'snapshotMaterial'],
      [literal(`${has('weighings')} OR ${has('dilution_aliquots')} OR ${has('gravimetric_readings')}`), 'listWeighed'],
      [literal(`${has('make_ups')} OR ${has('gravimetric_readings')}`), 'listMadeUp'],
      [literal('(SELECT u.full_name FROM users u WHERE u.id = `Preparation`.`created_by`)'), 'listCreatorName'],
      [literal('(SELECT u.initials FROM users u WHERE u.id = `Preparation`.`created_by`)'), 'listCreatorInitials'],
    ],
    where,
    order: [['id', 'DESC']],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  // the total apart: a window count would build every matching row (and its material name) before the limit
  const count = rows.length < q.pageSize && q.page === 1 ? rows.length : await Preparation.count({ where });
  const weighed = new Set(rows.filter((r) => Number(r.get('listWeighed'))).map((r) => r.id));
  const madeUp = new Set(rows.filter((r) => Number(r.get('listMadeUp'))).map((r) => r.id));
  const users = new Map(rows.filter((r) => r.get('listCreatorName') !== null).map((r) => [r.createdBy, { fullName: r.get('listCreatorName'), initials: r.get('listCreatorInitials') } as unknown as User]));
  // signed rows whose shown data differ from what was signed (record-integrity.ts): the check needs every signed
  // column, so those rows alone are read in full
  const sealedIds = rows.filter((r) => SEALED_STATUSES.includes(r.status)).map((r) => r.id);
  const full = sealedIds.length ? await Preparation.findAll({ where: { id: sealedIds } }) : [];
  const sealBroken = await sealStates(full, shownColumns);
  return { items: rows.map((p) => showSealBroken(summaryOf(p, users, stageOf(weighed.has(p.id), madeUp.has(p.id)), today), sealBroken.get(p.id))), total: count, page: q.page, pageSize: q.pageSize };
}

// ------------------------------------------------------------------ recomputation

async function recompute(p: Preparation, settings: LabSettings, computedAt: string, transaction: import('sequelize').Transaction) {
  const [weighings, makeUps] = await Promise.all([
    Weighing.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], transaction }),
    MakeUp.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], transaction }),
  ]);
  const w = activeWeighing(weighings);
  const m = makeUps.at(-1);
  if (!w || !m) return null;
  return computeResult({
    material: p.snapshotMaterial,
    analyteFormula: p.analyteFormula,
    target: { value: p.targetValue, unit: p.targetUnit },
    weighing: { id: w.id, netMg: w.netMg, balance: w.balanceSnapshot, conditions: w.conditions },
    makeUp: { id: m.id, flask: m.flaskSnapshot, solvent: m.solventSnapshot, solutionTemperatureC: m.solutionTemperatureC, applyTemperatureCorrection: Boolean(m.applyTemperatureCorrection) },
    rounding: settings.roundingRule,
    computedAt,
  });
}

/** Store a recomputed result on the record (version + 1); returns the audit changes. */
async function storeRecomputation(p: Preparation, settings: LabSettings, at: string, transaction: import('sequelize').Transaction, extra: Partial<Pick<Preparation, 'expiresOn' | 'expiryReason'>> = {}) {
  const before = { version: p.version, concentration: p.result?.concentration.display ?? null, expiresOn: p.expiresOn };
  const result = await recompute(p, settings, at, transaction);
  if (result) {
    p.result = result;
    p.concentrationDisplay = result.concentration.display;
  }
  if (extra.expiresOn) {
    p.expiresOn = extra.expiresOn;
    p.expiryReason = extra.expiryReason!;
  }
  p.version = p.version + 1;
  p.updatedAt = at;
  await p.save({ transaction });
  return diffFields(before, { version: p.version, concentration: p.result?.concentration.display ?? null, expiresOn: p.expiresOn });
}

// ------------------------------------------------------------------ weighing

export function usableBalanceGates(b: BalanceDto, today: string): Gate[] {
  const out: Gate[] = [];
  if (b.status !== 'in_service') {
    out.push({ code: 'balance_out_of_service', severity: 'block', message: `${b.identifier} is ${b.status.replace(/_/g, ' ')}`, action: `Do not weigh on ${b.identifier}; choose an in-service, calibrated balance` });
  }
  if (!b.calibrationDueOn) {
    out.push({ code: 'calibration_due_unknown', severity: 'block', message: `${b.identifier} has no calibration due date, so its calibration status is unknown`, action: `Ask the equipment custodian to record the calibration due date of ${b.identifier}` });
  } else if (dayNumber(b.calibrationDueOn) < dayNumber(today)) {
    out.push({ code: 'calibration_overdue', severity: 'block', message: `Calibration of ${b.identifier} was due on ${b.calibrationDueOn}`, action: `Do not weigh on ${b.identifier} until it is recalibrated; choose a calibrated balance` });
  }
  return out;
}

/** POST /api/preparations/:key/weighings: stored at once, append-only; the result is recomputed. */
export async function recordWeighing(key: string, input: WeighingInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetail> {
  const now = opts.now ?? new Date();
  const prep = await findPreparation(key);
  dataEntryMode(prep.identifier, prep.status); // 409 when expired or discarded
  await assertWeighable(prep); // a volumetric dilution has an aliquot, not a weighing
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const balanceId = input.balanceId ?? prep.balanceId;
  const b = await Balance.findByPk(balanceId);
  if (!b) throw AppError.validation(`No balance with id ${balanceId} is registered`, { balanceId: `No balance with id ${balanceId} is registered` });
  const balance = balanceSnapshot(b);
  const blocked = usableBalanceGates(balance, today);
  if (blocked.length) throw new GateBlockedError(blocked);

  const fields: Record<string, string> = {};
  const typed: Array<['reading' | 'before' | 'after', string | undefined]> = [['reading', input.reading], ['before', input.before], ['after', input.after]];
  // a reading the balance cannot show (beyond its capacity, or a direct reading of zero or below) is refused (422)
  const labels = { reading: 'A direct reading', before: 'The reading before transfer', after: 'The reading after transfer' } as const;
  for (const [field, value] of typed) {
    if (value === undefined) continue;
    const range = checkReadingRange(value, input.unit, balance.capacityG, { net: field === 'reading', balanceIdentifier: balance.identifier, what: labels[field] });
    if (!range.ok) fields[field] = range.message;
  }
  if (Object.keys(fields).length) throw new AppError('reading_impossible', 422, Object.values(fields)[0]!, { fields });
  // digits as the balance shows them (checked, then stored verbatim)
  for (const [field, value] of typed) {
    if (value === undefined) continue;
    const check = checkReadingDigits(value, input.unit, balance.readabilityMg, balance.identifier);
    if (!check.ok) fields[field] = check.message;
  }
  if (Object.keys(fields).length) throw AppError.validation(Object.values(fields)[0]!, fields);
  // how each reading came in: a balance print is parsed again and must say what was sent (422 at the field)
  const captures = checkedCaptures(typed, input.captures, input.unit, balance, settings, now.toISOString());

  let net: string;
  if (input.mode === 'direct') net = input.reading!;
  else {
    try {
      net = netFromDifference(input.before!, input.after!);
    } catch (e) {
      if (e instanceof CalcError) throw AppError.validation(e.message, { after: e.message });
      throw e;
    }
  }
  const netMg = readingInMg(net, input.unit);
  const conditions = resolveConditions(input.conditions, settings, now);

  // the core gives the air density at this weighing (and checks the conditions are within CIPM-2007)
  const check = runCore(
    coreRequest({
      material: prep.snapshotMaterial,
      analyteFormula: prep.analyteFormula,
      target: { value: prep.targetValue, unit: prep.targetUnit },
      volume: { value: prep.volumeValue, unit: prep.volumeUnit },
      balance,
      air: conditions,
      rounding: settings.roundingRule,
      readingMg: netMg,
    }),
    { kind: 'weighing', usesFlask: prep.flaskId !== null },
  );

  const window = prep.plan.window;
  const inWindow = isInWindow(netMg, window, 'mg');
  if (!inWindow && !(input.confirmOutOfWindow === true && input.outOfWindowReason && input.outOfWindowReason.length >= 3)) {
    const msg = `The net reading ${netMg} mg is outside the window ${window.low}–${window.high} mg (target ${prep.plan.targetReading.value} mg ± ${window.pct} %): confirm and give a reason to record it`;
    throw AppError.validation(msg, { outOfWindowReason: msg });
  }

  const existing = await Weighing.findAll({ where: { preparationId: prep.id }, order: [['id', 'ASC']] });
  const active = activeWeighing(existing);
  if (input.supersedesId === undefined && active) {
    throw AppError.conflict(`Weighing ${active.id} is already recorded for ${prep.identifier}; to correct it, send supersedesId ${active.id} with a correctionReason`, {
      supersedesId: `Send supersedesId ${active.id} and a correctionReason to correct the recorded weighing`,
    });
  }
  if (input.supersedesId !== undefined) {
    const target = existing.find((w) => w.id === input.supersedesId);
    if (!target) throw AppError.validation(`Weighing ${input.supersedesId} does not belong to ${prep.identifier}`, { supersedesId: `Weighing ${input.supersedesId} does not belong to ${prep.identifier}` });
    if (active && target.id !== active.id) {
      throw AppError.conflict(`Weighing ${target.id} has already been superseded; correct the current weighing ${active.id}`, { supersedesId: `Correct the current weighing ${active.id}` });
    }
  }

  // a signed record changes only with a reason and the changer's "amended" signature (REQUIREMENTS CO-01, CO-02)
  const amendment = await checkChange(prep, actor, input.signature, input.correctionReason, { lockoutThreshold: opts.lockoutThreshold ?? 5 });
  const at = now.toISOString();
  await writeTransaction(async (transaction) => {
    if (amendment) {
      await prep.reload({ transaction });
      if (prep.version !== amendment.fromVersion) throw AppError.conflict(`${prep.identifier} changed meanwhile (now version ${prep.version}); reload it and try again`);
    }
    const w = await Weighing.create(
      {
        preparationId: prep.id,
        mode: input.mode,
        reading: input.mode === 'direct' ? input.reading! : null,
        beforeReading: input.mode === 'difference' ? input.before! : null,
        afterReading: input.mode === 'difference' ? input.after! : null,
        unit: input.unit,
        netMg,
        balanceId: balance.id,
        balanceSnapshot: balance,
        conditions,
        airDensity: check.airDensity.value,
        inWindow,
        outOfWindowReason: inWindow ? null : input.outOfWindowReason!,
        supersedesId: input.supersedesId ?? null,
        correctionReason: input.supersedesId !== undefined ? input.correctionReason! : null,
        recordedBy: actor.id,
        recordedAt: at,
        captures: captures as Record<string, StoredCapture>,
      },
      { transaction },
    );
    const resultChanges = await storeRecomputation(prep, settings, at, transaction);
    const observation = {
      preparation: prep.identifier,
      mode: input.mode,
      reading: w.reading,
      before: w.beforeReading,
      after: w.afterReading,
      unit: input.unit,
      netMg,
      balance: balance.identifier,
      balanceStatus: balance.status,
      conditions,
      airDensity: w.airDensity,
      inWindow,
      outOfWindowReason: w.outOfWindowReason,
      supersedesId: w.supersedesId,
      captures: captureSummary(captures),
    };
    await recordAudit(
      { actor, action: 'weighing_recorded', entity: 'weighing', entityId: w.id, changes: [...diffFields({}, observation), ...resultChanges.map((c) => ({ ...c, field: `preparation.${c.field}` }))], reason: w.correctionReason ?? w.outOfWindowReason },
      transaction,
    );
    if (w.supersedesId !== null) {
      await recordAudit({ actor, action: 'weighing_superseded', entity: 'weighing', entityId: w.supersedesId, changes: [{ field: 'supersededById', oldValue: null, newValue: w.id }], reason: w.correctionReason }, transaction);
    }
    if (amendment) await recordAmendment(prep, amendment, transaction, now);
  });
  return getPreparation(String(prep.id), actor.id);
}

// ------------------------------------------------------------------ make-up

/** POST /api/preparations/:key/make-up */
export async function recordMakeUp(key: string, input: MakeUpInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetail> {
  const now = opts.now ?? new Date();
  const prep = await findPreparation(key);
  dataEntryMode(prep.identifier, prep.status); // 409 when expired or discarded
  if (isGravimetricPlan(prep)) throw new AppError('not_volumetric', 409, `${prep.identifier} is a gravimetric dilution: it is made up to a mass; record both readings (POST /api/preparations/${prep.identifier}/gravimetric-readings)`);
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);

  const f = await VolumetricWare.findOne({ where: { identifier: input.flaskIdentifier } });
  const plannedFlask = prep.snapshotFlask;
  const plannedMl = convertVolume(prep.volumeValue, prep.volumeUnit, 'mL');
  const expected = plannedFlask ? `${plannedFlask.identifier} or another in-service ${plannedFlask.nominalVolumeMl} mL volumetric flask` : `an in-service ${plannedMl.toString()} mL volumetric flask`;
  if (!f) throw AppError.validation(`No flask ${input.flaskIdentifier} is registered`, { flaskIdentifier: `No flask ${input.flaskIdentifier} is registered; scan ${expected}` });
  const registered = wareSnapshot(f);
  // the flask's calibrated volume when the lab allows it, frozen in the make-up's snapshot (a stock or a dilution;
  // a mix keeps the tolerance budget of mix-1)
  const usesCalibration = registered.kind === 'volumetric_flask' && registered.status === 'in_service' && (await lineageRow(prep.id)).kind !== 'mix';
  const flask = usesCalibration ? await withCalibratedVolume(registered, registered.nominalVolumeMl, settings, today) : registered;
  if (flask.kind !== 'volumetric_flask') {
    throw AppError.validation(`${flask.identifier} is not a volumetric flask`, { flaskIdentifier: `${flask.identifier} is a ${flask.kind.replace(/_/g, ' ')}; scan ${expected}` });
  }
  if (flask.status !== 'in_service') {
    throw AppError.validation(`${flask.identifier} is ${flask.status.replace(/_/g, ' ')}`, { flaskIdentifier: `${flask.identifier} is ${flask.status.replace(/_/g, ' ')}; scan ${expected}` });
  }
  const substituted = plannedFlask ? flask.identifier !== plannedFlask.identifier : false;
  if (!new D(flask.nominalVolumeMl).eq(plannedMl)) {
    throw AppError.validation(`${flask.identifier} holds ${flask.nominalVolumeMl} mL, not the planned ${plannedMl.toString()} mL`, {
      flaskIdentifier: `${flask.identifier} holds ${flask.nominalVolumeMl} mL; scan ${expected}`,
    });
  }

  const s = await Solvent.findByPk(input.solventId);
  if (!s) throw AppError.validation(`No solvent with id ${input.solventId} is registered`, { solventId: `No solvent with id ${input.solventId} is registered` });
  const solvent = solventSnapshot(s);
  if (solvent.status !== 'accepted' || (solvent.expiresOn && dayNumber(solvent.expiresOn) < dayNumber(today))) {
    const why = solvent.status !== 'accepted' ? `is ${solvent.status}` : `expired on ${solvent.expiresOn}`;
    throw new AppError('solvent_not_usable', 422, `${solvent.name} lot ${solvent.lot} ${why} and cannot be used`, { fields: { solventId: `${solvent.name} lot ${solvent.lot} ${why}; choose an accepted, in-date solvent` } });
  }
  if (input.solventLot !== solvent.lot) {
    // the message never says which lot is registered: the lot is read from the bottle, not copied from the screen
    throw AppError.validation(`Lot ${input.solventLot} is not a registered lot of ${solvent.name}`, { solventLot: `Lot ${input.solventLot} is not registered for ${solvent.name}; read the lot on the bottle again, or choose the solvent you used` });
  }
  if (input.applyTemperatureCorrection && !solvent.expansionCoefficientPerK) {
    throw AppError.validation(`${solvent.name} has no expansion coefficient recorded`, { applyTemperatureCorrection: `${solvent.name} has no expansion coefficient recorded, so the concentration cannot be corrected to 20 °C` });
  }
  await assertFlaskFree(flask, 'flaskIdentifier', today, { exceptPreparationId: prep.id }); // one flask, one open solution
  const previous = await MakeUp.findOne({ where: { preparationId: prep.id }, order: [['id', 'DESC']] });
  if (previous && !input.correctionReason) {
    throw AppError.validation(`A make-up is already recorded for ${prep.identifier}`, { correctionReason: 'A make-up is already recorded: give the reason for recording a new one' });
  }

  const amendment = await checkChange(prep, actor, input.signature, input.correctionReason, { lockoutThreshold: opts.lockoutThreshold ?? 5 });
  const at = now.toISOString();
  const expiry = await lineageExpiry(prep, settings, today); // stability rule, material and every parent (EX-01, EX-02)
  await writeTransaction(async (transaction) => {
    if (amendment) {
      await prep.reload({ transaction });
      if (prep.version !== amendment.fromVersion) throw AppError.conflict(`${prep.identifier} changed meanwhile (now version ${prep.version}); reload it and try again`);
    }
    await assertFlaskFree(flask, 'flaskIdentifier', today, { exceptPreparationId: prep.id, transaction }); // again under the write lock
    const m = await MakeUp.create(
      {
        preparationId: prep.id,
        flaskId: flask.id,
        flaskIdentifier: flask.identifier,
        flaskSnapshot: flask,
        substituted,
        solventId: solvent.id,
        solventLot: input.solventLot,
        solventSnapshot: solvent,
        solutionTemperatureC: input.solutionTemperatureC,
        applyTemperatureCorrection: input.applyTemperatureCorrection,
        correctionReason: previous ? input.correctionReason! : null,
        supersedesId: previous?.id ?? null,
        recordedBy: actor.id,
        recordedAt: at,
      },
      { transaction },
    );
    const resultChanges = await storeRecomputation(prep, settings, at, transaction, { expiresOn: expiry.expiresOn, expiryReason: expiry.reason });
    const dilutionChanges = await storeDilutionResult(prep, settings, transaction); // a dilution's result is kept with the record (migration 0011); [] for a stock
    if (dilutionChanges.length) {
      await prep.save({ transaction });
      resultChanges.push(...dilutionChanges);
    }
    await recordAudit(
      {
        actor,
        action: 'make_up_recorded',
        entity: 'make_up',
        entityId: m.id,
        changes: [
          ...diffFields(
            {},
            {
              preparation: prep.identifier,
              flask: flask.identifier,
              substituted,
              solventId: solvent.id,
              solventLot: solvent.lot,
              solutionTemperatureC: input.solutionTemperatureC,
              applyTemperatureCorrection: input.applyTemperatureCorrection,
              supersedesId: m.supersedesId,
            },
          ),
          ...resultChanges.map((c) => ({ ...c, field: `preparation.${c.field}` })),
        ],
        reason: m.correctionReason,
      },
      transaction,
    );
    if (amendment) await recordAmendment(prep, amendment, transaction, now);
  });
  return getPreparation(String(prep.id), actor.id);
}
