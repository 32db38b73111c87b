/**
 * Standards made from standards (REQUIREMENTS TR-04 genealogy, TR-11 only verified in-date parents,
 * EX-01 expiry capped by every parent; METROLOGY §5.5 dilutions).
 * A dilution (or a calibration-series level) is a preparation of its own: its own identifier, its aliquot and
 * make-up as original observations, its own signatures. Its parent is frozen as a snapshot at use
 * (preparation_parents). Volumetric dilutions have no weighing: the `plan` column holds the dilution plan
 * and the detail's `dilution` section carries the planned and recomputed results (the stock fields stay stock).
 * The row's material and balance are the parent's (the columns are NOT NULL; no weighing is made on that balance).
 */
import { Op, QueryTypes, type Transaction } from 'sequelize';
import { CalcError, D } from '../../shared/calc/index.ts';
import { pistonSetting, pistonStepMl, proposeIntermediate, proposeSeries, type SeriesWare } from '../../shared/calc/dilution.ts';
import { classATolerance, formatPreparationId, parsePreparationId } from '../../shared/prep/index.ts';
import type { VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type {
  AliquotInput,
  CreateSeriesInput,
  CreateSeriesResponse,
  DilutionInput,
  ParentSnapshot,
  PreparationDetailWithLineage,
  PreparationKind,
  SeriesDto,
  SeriesProposalInput,
  SeriesProposalResponse,
} from '../../shared/schemas/lineage.ts';
import type { LabSettings } from '../../shared/schemas/settings.ts';
import type { StoredPlan } from '../db/models/index.ts';
import { DilutionAliquot, Preparation, PreparationEvent, PreparationParent, Series, Solvent, User, VolumetricWare } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { dataEntryMode } from './preparation-status.ts';
import { wareSnapshot } from './preparation-snapshots.ts';
import { getPreparation, labDate, type Actor, type WriteOptions } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';
import { isGravimetricPlan } from './gravimetric-calc.ts';
import { failedCheckOf, refuseFailedWare } from './volume-check-gate.ts';
import { assertFlaskFree, flasksHoldingSolutions } from './flask-occupancy.ts';
import { withCalibratedVolume } from './calibrated-volume.ts';
import { activeAliquot, concentrationOf, dilutionBeta, dilutionOf, expiryFor, flaskUncertainty, isDilutionKind, lineageRow, pipetteUncertainty, storeDilutionResult } from './lineage-view.ts';

/** |planned − target|/target above which a dilution is refused (the chosen ware cannot give the target). */
const MAX_TARGET_DEVIATION = new D('0.05');

// ------------------------------------------------------------------ parents

export async function findPreparationRow(key: string, field?: string): Promise<Preparation> {
  let p: Preparation | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) p = await Preparation.findByPk(Number(key));
  else if (parsePreparationId(key)) p = await Preparation.findOne({ where: { identifier: key } });
  if (!p) {
    if (field) throw AppError.validation(`No preparation ${key}`, { [field]: `No preparation ${key} is recorded` });
    throw AppError.notFound(`Preparation ${key}`);
  }
  return p;
}

/**
 * TR-11: only a verified, in-date parent with a result can be used. A refusal is audited ("attempt logged")
 * and answered 422 parent_not_usable with a message naming the parent's state or expiry.
 */
export async function usableParent(p: Preparation, actor: Actor, settings: LabSettings, today: string, field: string): Promise<ParentSnapshot> {
  const { kind } = await lineageRow(p.id);
  let why: string | null = null;
  if (p.expiresOn < today) why = `${p.identifier} expired on ${p.expiresOn} and cannot be used as a parent`;
  else if (p.status !== 'verified') why = `${p.identifier} is '${p.status}', not verified: only verified, in-date standards can be used as a parent`;
  else if (kind === 'mix') why = `${p.identifier} is a mix of several analytes: a mix cannot be used as a parent yet (a dilution takes one analyte's concentration)`;
  const concentration = why ? null : await concentrationOf(p, kind, settings);
  if (!why && !concentration) why = `${p.identifier} has no recomputed concentration, so it cannot be used as a parent`;
  if (why) {
    await writeTransaction((transaction) =>
      recordAudit({ actor, action: 'parent_refused', entity: 'preparation', entityId: p.id, changes: [{ field: 'parent', oldValue: null, newValue: p.identifier }], reason: why }, transaction),
    );
    throw new AppError('parent_not_usable', 422, why, { fields: { [field]: why } });
  }
  return { id: p.id, identifier: p.identifier, kind, status: p.status, version: p.version, analyteFormula: p.analyteFormula, concentration: concentration!, expiresOn: p.expiresOn };
}

// ------------------------------------------------------------------ ware

export async function pipetteFor(id: number, field: string): Promise<WareDto> {
  const w = await VolumetricWare.findByPk(id);
  if (!w) throw AppError.validation(`No volumetric ware with id ${id} is registered`, { [field]: `No volumetric ware with id ${id} is registered` });
  const p = wareSnapshot(w);
  if (p.kind !== 'bulb_pipette' && p.kind !== 'piston_pipette') throw AppError.validation(`${p.identifier} is not a pipette`, { [field]: `${p.identifier} is a ${p.kind.replace(/_/g, ' ')}; choose a bulb or piston pipette` });
  if (p.status !== 'in_service') throw AppError.validation(`${p.identifier} is ${p.status.replace(/_/g, ' ')}`, { [field]: `${p.identifier} is ${p.status.replace(/_/g, ' ')}; choose an in-service pipette` });
  await refuseFailedWare(p, field);
  if (!pipetteUncertainty(p)) throw AppError.validation(`${p.identifier} has no tolerance recorded`, { [field]: `${p.identifier} has no tolerance recorded, so its volume uncertainty is unknown; record it in the inventory` });
  return p;
}

export async function flaskFor(id: number, field: string): Promise<WareDto> {
  const w = await VolumetricWare.findByPk(id);
  if (!w) throw AppError.validation(`No volumetric ware with id ${id} is registered`, { [field]: `No volumetric ware with id ${id} is registered` });
  const f = wareSnapshot(w);
  if (f.kind !== 'volumetric_flask') throw AppError.validation(`${f.identifier} is not a volumetric flask`, { [field]: `${f.identifier} is a ${f.kind.replace(/_/g, ' ')}; choose a volumetric flask` });
  if (f.status !== 'in_service') throw AppError.validation(`${f.identifier} is ${f.status.replace(/_/g, ' ')}`, { [field]: `${f.identifier} is ${f.status.replace(/_/g, ' ')}; choose an in-service flask` });
  await refuseFailedWare(f, field);
  if (!flaskUncertainty(f)) throw AppError.validation(`${f.identifier} has no tolerance recorded`, { [field]: `${f.identifier} has no tolerance recorded, so its volume uncertainty is unknown; record it in the inventory` });
  return f;
}

/** Bulb pipettes deliver their nominal volume; piston pipettes are set from 10 % of nominal to nominal (common practice). */
export function aliquotVolume(p: WareDto, typed: string | undefined, field: string): string {
  if (p.kind === 'bulb_pipette') {
    if (typed !== undefined && !new D(typed).eq(p.nominalVolumeMl)) throw AppError.validation(`${p.identifier} delivers ${p.nominalVolumeMl} mL`, { [field]: `${p.identifier} is a bulb pipette and delivers ${p.nominalVolumeMl} mL only` });
    return p.nominalVolumeMl;
  }
  const v = typed ?? p.nominalVolumeMl;
  const n = new D(p.nominalVolumeMl);
  if (new D(v).gt(n) || new D(v).lt(n.mul('0.1'))) {
    throw AppError.validation(`${v} mL is outside the range of ${p.identifier}`, { [field]: `Set ${p.identifier} between ${n.mul('0.1').toString()} and ${n.toString()} mL (10 % of nominal to nominal)` });
  }
  const step = pistonStepMl(n);
  if (!new D(v).mod(step).isZero()) {
    throw AppError.validation(`${p.identifier} cannot be set to ${v} mL`, { [field]: `${p.identifier} is set in steps of ${step.toString()} mL: use ${pistonSetting(v, n).toString()} mL` });
  }
  return v;
}

// ------------------------------------------------------------------ planning a dilution

interface PlannedLevel {
  target: { value: string; unit: string };
  pipette: WareDto;
  flask: WareDto;
  aliquotMl: string;
  planned: ReturnType<typeof dilutionOf>;
}

async function planLevel(parent: ParentSnapshot, level: { target: { value: string; unit: string }; pipetteId: number; flaskId: number; aliquotMl?: string }, settings: LabSettings, prefix: string, today: string): Promise<PlannedLevel> {
  if (level.target.unit !== parent.concentration.unit) {
    throw AppError.validation(`Give the target in ${parent.concentration.unit}, the unit of ${parent.identifier}`, { [`${prefix}target.unit`]: `Give the target in ${parent.concentration.unit}, the unit of ${parent.identifier}` });
  }
  const [registeredPipette, registeredFlask] = await Promise.all([pipetteFor(level.pipetteId, `${prefix}pipetteId`), flaskFor(level.flaskId, `${prefix}flaskId`)]);
  const aliquotMl = aliquotVolume(registeredPipette, level.aliquotMl, `${prefix}aliquotMl`);
  await assertFlaskFree(registeredFlask, `${prefix}flaskId`, today); // one flask, one open solution (flask-occupancy.ts)
  // calibrated volumes when the lab allows it, frozen in the plan's snapshots (calibrated-volume.ts)
  const [pipette, flask] = await Promise.all([
    withCalibratedVolume(registeredPipette, aliquotMl, settings, today),
    withCalibratedVolume(registeredFlask, registeredFlask.nominalVolumeMl, settings, today),
  ]);
  if (new D(aliquotMl).gte(flask.nominalVolumeMl)) {
    throw AppError.validation(`A ${aliquotMl} mL aliquot does not fit a ${flask.nominalVolumeMl} mL flask`, { [`${prefix}flaskId`]: `Choose a flask larger than the ${aliquotMl} mL aliquot` });
  }
  let planned;
  try {
    planned = dilutionOf(parent, aliquotMl, pipette, flask, settings.roundingRule, dilutionBeta(null)); // the plan's expected budget: dilution-2, water's β until the solvent is known
  } catch (e) {
    if (e instanceof CalcError) throw AppError.validation(e.message, { [`${prefix}target`]: e.message });
    throw e;
  }
  const dev = new D(planned.value).minus(level.target.value).div(level.target.value).abs();
  if (dev.gt(MAX_TARGET_DEVIATION)) {
    const msg = `${aliquotMl} mL of ${parent.identifier} into ${flask.nominalVolumeMl} mL gives ${new D(planned.value).toSignificantDigits(4).toString()} ${parent.concentration.unit}, not ${level.target.value} ${level.target.unit}; choose another pipette or flask`;
    throw new AppError('target_not_reachable', 422, msg, { fields: { [`${prefix}target`]: msg } });
  }
  return { target: level.target, pipette, flask, aliquotMl, planned };
}

export async function nextSequence(prefix: string, year: number, transaction: Transaction): Promise<number> {
  const sequelize = Preparation.sequelize!;
  await sequelize.query(
    `INSERT INTO preparation_sequences (prefix, year, last_seq) VALUES (:prefix, :year, 1)
     ON CONFLICT (prefix, year) DO UPDATE SET last_seq = last_seq + 1`,
    { replacements: { prefix, year }, transaction },
  );
  const rows = await sequelize.query<{ last_seq: number }>('SELECT last_seq FROM preparation_sequences WHERE prefix = :prefix AND year = :year', { replacements: { prefix, year }, type: QueryTypes.SELECT, transaction });
  return Number(rows[0]!.last_seq);
}

async function insertDilution(
  parentRow: Preparation,
  parent: ParentSnapshot,
  level: PlannedLevel,
  extra: { kind: PreparationKind; seriesId: number | null; solventId?: number; notes?: string },
  actor: Actor,
  settings: LabSettings,
  today: string,
  at: string,
  transaction: Transaction,
): Promise<number> {
  const year = Number(today.slice(0, 4));
  const identifier = formatPreparationId(settings.idPrefix, year, await nextSequence(settings.idPrefix, year, transaction));
  const expiry = expiryFor({ kind: extra.kind, analyteFormula: parent.analyteFormula, target: level.target, material: parentRow.snapshotMaterial, parents: [parent] }, settings, today);
  const inputs = {
    method: 'volumetric',
    parentKey: parent.identifier,
    target: level.target,
    pipetteId: level.pipette.id,
    flaskId: level.flask.id,
    aliquotMl: level.aliquotMl,
    ...(extra.solventId !== undefined ? { solventId: extra.solventId } : {}),
  };
  const plan = { kind: 'dilution', dilution: { pipette: level.pipette, aliquotMl: level.aliquotMl, finalMl: level.flask.nominalVolumeMl, planned: level.planned } };
  const prep = await Preparation.create(
    {
      identifier,
      status: 'planned',
      version: 1,
      materialId: parentRow.materialId,
      analyteFormula: parent.analyteFormula,
      targetValue: level.target.value,
      targetUnit: level.target.unit,
      volumeValue: level.flask.nominalVolumeMl,
      volumeUnit: 'mL',
      flaskId: level.flask.id,
      balanceId: parentRow.balanceId,
      inputs: inputs as unknown as Preparation['inputs'],
      notes: extra.notes ? extra.notes : null,
      conditionsUsed: parentRow.conditionsUsed,
      snapshotMaterial: parentRow.snapshotMaterial,
      snapshotBalance: parentRow.snapshotBalance,
      snapshotFlask: level.flask,
      plan: plan as unknown as StoredPlan,
      gates: [],
      result: null,
      concentrationDisplay: null,
      expiresOn: expiry.expiresOn,
      expiryReason: expiry.reason,
      createdOn: today,
      createdBy: actor.id,
      createdAt: at,
      updatedAt: at,
    },
    { transaction },
  );
  await Preparation.sequelize!.query('UPDATE preparations SET kind = :kind, series_id = :seriesId WHERE id = :id', { replacements: { kind: extra.kind, seriesId: extra.seriesId, id: prep.id }, transaction });
  await PreparationParent.create({ preparationId: prep.id, parentPreparationId: parent.id, aliquotWareId: level.pipette.id, role: 'aliquot', plannedVolumeMl: level.aliquotMl, snapshot: parent, createdAt: at }, { transaction });
  await PreparationEvent.create({ preparationId: prep.id, status: 'planned', note: extra.notes ? extra.notes : null, byId: actor.id, byName: actor.fullName, at }, { transaction });
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
          kind: extra.kind,
          status: 'planned',
          parent: `${parent.identifier} v${parent.version} (${parent.concentration.display}, expires ${parent.expiresOn})`,
          target: `${level.target.value} ${level.target.unit}`,
          pipette: level.pipette.identifier,
          aliquotMl: level.aliquotMl,
          flask: level.flask.identifier,
          plannedConcentration: level.planned.display,
          expiresOn: expiry.expiresOn,
          expiryReason: expiry.reason,
        },
      ),
    },
    transaction,
  );
  return prep.id;
}

/** POST /api/preparations/:key/dilutions (key = the parent). */
export async function createDilution(parentKey: string, input: DilutionInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetailWithLineage> {
  const now = opts.now ?? new Date();
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const parentRow = await findPreparationRow(parentKey);
  const parent = await usableParent(parentRow, actor, settings, today, 'parent');
  if (input.solventId !== undefined && !(await Solvent.findByPk(input.solventId))) {
    throw AppError.validation(`No solvent with id ${input.solventId} is registered`, { solventId: `No solvent with id ${input.solventId} is registered` });
  }
  const level = await planLevel(parent, input, settings, '', today);
  const id = await writeTransaction((t) =>
    insertDilution(parentRow, parent, level, { kind: 'dilution', seriesId: null, ...(input.solventId !== undefined ? { solventId: input.solventId } : {}), ...(input.notes ? { notes: input.notes } : {}) }, actor, settings, today, now.toISOString(), t),
  );
  return (await getPreparation(String(id), actor.id)) as PreparationDetailWithLineage;
}

// ------------------------------------------------------------------ aliquot at the bench

/** POST /api/preparations/:key/aliquots: the aliquot delivered (pipette confirmed by identifier); append-only. */
export async function recordAliquot(key: string, input: AliquotInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetailWithLineage> {
  const now = opts.now ?? new Date();
  const prep = await findPreparationRow(key);
  const { kind } = await lineageRow(prep.id);
  if (kind === 'mix') return (await import('./mix.service.ts')).recordMixAliquot(prep, input, actor, opts); // one aliquot per component
  if (input.componentId !== undefined) throw AppError.validation(`${prep.identifier} is not a mix`, { componentId: `${prep.identifier} is not a mix: send no componentId` });
  if (!isDilutionKind(kind)) throw new AppError('not_a_dilution', 409, `${prep.identifier} is a ${kind}, not a dilution: record a weighing instead`);
  if (isGravimetricPlan(prep)) throw new AppError('not_volumetric', 409, `${prep.identifier} is a gravimetric dilution: record both readings (POST /api/preparations/${prep.identifier}/gravimetric-readings), not an aliquot volume`);
  dataEntryMode(prep.identifier, prep.status); // 409 when expired or discarded
  if (prep.status !== 'planned') {
    throw AppError.conflict(`${prep.identifier} is '${prep.status}': aliquots can be recorded or corrected only while the record is planned`);
  }
  const link = (await PreparationParent.findOne({ where: { preparationId: prep.id, role: 'aliquot' } }))!;
  const planned = (prep.plan as unknown as { dilution: { pipette: WareDto; aliquotMl: string } }).dilution;
  const w = await VolumetricWare.findOne({ where: { identifier: input.pipetteIdentifier } });
  const expected = `${planned.pipette.identifier} or another in-service ${planned.pipette.nominalVolumeMl} mL ${planned.pipette.kind.replace(/_/g, ' ')}`;
  if (!w) throw AppError.validation(`No pipette ${input.pipetteIdentifier} is registered`, { pipetteIdentifier: `No pipette ${input.pipetteIdentifier} is registered; scan ${expected}` });
  const pipette = wareSnapshot(w);
  if (pipette.kind !== planned.pipette.kind || !new D(pipette.nominalVolumeMl).eq(planned.pipette.nominalVolumeMl)) {
    throw AppError.validation(`${pipette.identifier} is not the planned kind of pipette`, { pipetteIdentifier: `${pipette.identifier} is a ${pipette.nominalVolumeMl} mL ${pipette.kind.replace(/_/g, ' ')}; scan ${expected}` });
  }
  if (pipette.status !== 'in_service') throw AppError.validation(`${pipette.identifier} is ${pipette.status.replace(/_/g, ' ')}`, { pipetteIdentifier: `${pipette.identifier} is ${pipette.status.replace(/_/g, ' ')}; scan ${expected}` });
  if (!pipetteUncertainty(pipette)) throw AppError.validation(`${pipette.identifier} has no tolerance recorded`, { pipetteIdentifier: `${pipette.identifier} has no tolerance recorded; record it in the inventory` });
  const volumeMl = aliquotVolume(pipette, input.volumeMl ?? (pipette.kind === 'piston_pipette' ? planned.aliquotMl : undefined), 'volumeMl');
  const settings = await getSettings();
  // the pipette's calibrated volume at the volume delivered, when the lab allows it, frozen in the aliquot's snapshot
  const pipetteUsed = await withCalibratedVolume(pipette, volumeMl, settings, labDate(now, settings.timeZone));

  const existing = await DilutionAliquot.findAll({ where: { preparationId: prep.id }, order: [['id', 'ASC']] });
  const active = activeAliquot(existing);
  if (input.supersedesId === undefined && active) {
    throw AppError.conflict(`Aliquot ${active.id} is already recorded for ${prep.identifier}; to correct it, send supersedesId ${active.id} with a correctionReason`, { supersedesId: `Send supersedesId ${active.id} and a correctionReason to correct the recorded aliquot` });
  }
  if (input.supersedesId !== undefined) {
    if (!existing.some((a) => a.id === input.supersedesId)) throw AppError.validation(`Aliquot ${input.supersedesId} does not belong to ${prep.identifier}`, { supersedesId: `Aliquot ${input.supersedesId} does not belong to ${prep.identifier}` });
    if (active && active.id !== input.supersedesId) throw AppError.conflict(`Aliquot ${input.supersedesId} has already been superseded; correct the current aliquot ${active.id}`, { supersedesId: `Correct the current aliquot ${active.id}` });
    if (!input.correctionReason) throw AppError.validation('A correction needs a reason', { correctionReason: 'Give the reason for the correction' });
  }
  const at = now.toISOString();
  await writeTransaction(async (transaction) => {
    const a = await DilutionAliquot.create(
      {
        preparationId: prep.id,
        parentLinkId: link.id,
        pipetteId: pipette.id,
        pipetteIdentifier: pipette.identifier,
        pipetteSnapshot: pipetteUsed,
        volumeMl,
        supersedesId: input.supersedesId ?? null,
        correctionReason: input.supersedesId !== undefined ? input.correctionReason! : null,
        recordedBy: actor.id,
        recordedAt: at,
      },
      { transaction },
    );
    const before = { version: prep.version, concentration: prep.concentrationDisplay };
    const stored = await storeDilutionResult(prep, settings, transaction); // the result is kept with the record (migration 0011)
    prep.version = prep.version + 1;
    prep.updatedAt = at;
    await prep.save({ transaction });
    await recordAudit(
      {
        actor,
        action: 'aliquot_recorded',
        entity: 'aliquot',
        entityId: a.id,
        changes: [
          ...diffFields({}, { preparation: prep.identifier, pipette: pipette.identifier, substituted: pipette.identifier !== planned.pipette.identifier, volumeMl, supersedesId: a.supersedesId }),
          ...diffFields(before, { version: prep.version, concentration: prep.concentrationDisplay }).map((c) => ({ ...c, field: `preparation.${c.field}` })),
          ...stored.filter((c) => c.field === 'dilutionResult').map((c) => ({ ...c, field: `preparation.${c.field}` })),
        ],
        reason: a.correctionReason,
      },
      transaction,
    );
  });
  return (await getPreparation(String(prep.id), actor.id)) as PreparationDetailWithLineage;
}

// ------------------------------------------------------------------ calibration series

async function seriesWare(): Promise<{ pipettes: SeriesWare[]; flasks: SeriesWare[] }> {
  const rows = (await VolumetricWare.findAll({ where: { kind: { [Op.in]: ['bulb_pipette', 'piston_pipette', 'volumetric_flask'] } }, order: [['identifier', 'ASC']] })).map(wareSnapshot);
  const toSeries = (w: WareDto): SeriesWare => ({
    id: w.id,
    identifier: w.identifier,
    kind: w.kind,
    nominalVolumeMl: w.nominalVolumeMl,
    class: w.class,
    toleranceMl: w.toleranceMl ?? (w.class === 'A' && w.kind !== 'piston_pipette' ? (classATolerance(w.kind === 'volumetric_flask' ? 'flask' : 'pipette', w.nominalVolumeMl)?.toleranceMl ?? null) : null),
    status: w.status,
  });
  // ware whose latest verified volume check failed is never proposed (the planning gate would refuse it)
  const failed = new Set<number>();
  for (const w of rows) if (await failedCheckOf(w.id)) failed.add(w.id);
  const usable = rows.filter((w) => !failed.has(w.id));
  return { pipettes: usable.filter((w) => w.kind !== 'volumetric_flask').map(toSeries), flasks: usable.filter((w) => w.kind === 'volumetric_flask').map(toSeries) };
}

/** POST /api/series/proposal */
export async function proposeSeriesFor(input: SeriesProposalInput, actor: Actor, opts: WriteOptions = {}): Promise<SeriesProposalResponse> {
  const now = opts.now ?? new Date();
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const parentRow = await findPreparationRow(input.parentKey, 'parentKey');
  const parent = await usableParent(parentRow, actor, settings, today, 'parentKey');
  const [ware, held] = await Promise.all([seriesWare(), flasksHoldingSolutions(today)]); // the same rule as make-up and planning
  const minAliquotMl = input.minAliquotMl ?? '1';
  const request = {
    parentConcentration: { value: parent.concentration.value, unit: parent.concentration.unit, standardUncertainty: parent.concentration.standardUncertainty },
    levels: input.levels,
    pipettes: ware.pipettes.filter((p) => p.toleranceMl),
    flasks: ware.flasks.filter((f) => f.toleranceMl && !held.has(f.id)),
    minAliquotMl,
    fullerBudget: { betaPerK: dilutionBeta(null).betaPerK }, // expected u_r as the levels will be computed (dilution-2)
  };
  const levels = proposeSeries(request);
  // levels out of reach of one pipette and flask: propose the first dilution they can come from (planned by the chemist)
  const intermediate = proposeIntermediate(request, levels);
  return { parent, minAliquotMl, levels, ...(intermediate ? { intermediate } : {}) };
}

async function seriesDto(s: Series): Promise<SeriesDto> {
  const [parent, creator, rows] = await Promise.all([Preparation.findByPk(s.parentPreparationId), User.findByPk(s.createdBy), Preparation.sequelize!.query<{ id: number }>('SELECT id FROM preparations WHERE series_id = :id ORDER BY id', { replacements: { id: s.id }, type: QueryTypes.SELECT })]);
  const levels = rows.length ? await Preparation.findAll({ where: { id: rows.map((r) => r.id) }, order: [['id', 'ASC']] }) : [];
  return {
    id: s.id,
    identifier: s.identifier,
    parent: { id: s.parentPreparationId, identifier: parent?.identifier ?? `preparation ${s.parentPreparationId}` },
    analyteFormula: s.analyteFormula,
    unit: s.unit,
    createdBy: { id: s.createdBy, fullName: creator?.fullName ?? `user ${s.createdBy}` },
    createdAt: s.createdAt,
    levels: levels.map((p) => {
      const d = (p.plan as unknown as { dilution: { pipette: WareDto; planned: { value: string } } }).dilution;
      return {
        id: p.id,
        identifier: p.identifier,
        status: p.status,
        target: { value: p.targetValue, unit: p.targetUnit },
        pipetteIdentifier: d.pipette.identifier,
        flaskIdentifier: p.snapshotFlask?.identifier ?? '',
        plannedConcentration: d.planned.value,
        expiresOn: p.expiresOn,
      };
    }),
  };
}

/** Series identifier: lab prefix + year + "S" + 3-digit sequence, e.g. HWL-2026-S001 (own sequence, never reused). */
export function formatSeriesId(prefix: string, year: number, seq: number): string {
  return `${prefix}-${year}-S${String(seq).padStart(3, '0')}`;
}

/** POST /api/series: the series and one planned preparation per level, in one write transaction. */
export async function createSeries(input: CreateSeriesInput, actor: Actor, opts: WriteOptions = {}): Promise<CreateSeriesResponse> {
  const now = opts.now ?? new Date();
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const parentRow = await findPreparationRow(input.parentKey, 'parentKey');
  const parent = await usableParent(parentRow, actor, settings, today, 'parentKey');
  const planned: PlannedLevel[] = [];
  for (const [i, level] of input.levels.entries()) planned.push(await planLevel(parent, level, settings, `levels.${i}.`, today));
  const flaskFields: Record<string, string> = {};
  planned.forEach((l, i) => {
    const first = planned.findIndex((o) => o.flask.id === l.flask.id);
    if (first < i) flaskFields[`levels.${i}.flaskId`] = `${l.flask.identifier} is already the flask of level ${first + 1}; each level needs its own flask`;
  });
  if (Object.keys(flaskFields).length) throw AppError.validation('Two levels of the series cannot be made up in the same flask', flaskFields);
  const at = now.toISOString();
  const { seriesId, ids } = await writeTransaction(async (transaction) => {
    const year = Number(today.slice(0, 4));
    const seq = await nextSequence(`${settings.idPrefix}-S`, year, transaction);
    const s = await Series.create({ identifier: formatSeriesId(settings.idPrefix, year, seq), parentPreparationId: parent.id, analyteFormula: parent.analyteFormula, unit: parent.concentration.unit, createdBy: actor.id, createdAt: at }, { transaction });
    const ids: number[] = [];
    for (const level of planned) ids.push(await insertDilution(parentRow, parent, level, { kind: 'series_level', seriesId: s.id, ...(input.notes ? { notes: input.notes } : {}) }, actor, settings, today, at, transaction));
    await recordAudit(
      { actor, action: 'create', entity: 'series', entityId: s.id, changes: diffFields({}, { identifier: s.identifier, parent: parent.identifier, levels: planned.map((l) => `${l.target.value} ${l.target.unit}: ${l.aliquotMl} mL ${l.pipette.identifier} → ${l.flask.identifier}`) }) },
      transaction,
    );
    return { seriesId: s.id, ids };
  });
  const s = (await Series.findByPk(seriesId))!;
  return { series: await seriesDto(s), preparations: (await Promise.all(ids.map((id) => getPreparation(String(id), actor.id)))) as PreparationDetailWithLineage[] };
}

/** GET /api/series/:key (numeric id or identifier such as HWL-2026-S001). */
export async function getSeries(key: string): Promise<SeriesDto> {
  let s: Series | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) s = await Series.findByPk(Number(key));
  else if (/^[A-Z][A-Z0-9]{1,7}-\d{4}-S\d{3,}$/.test(key)) s = await Series.findOne({ where: { identifier: key } });
  if (!s) throw AppError.notFound(`Series ${key}`);
  return seriesDto(s);
}

