/**
 * Gravimetric dilutions (METROLOGY §5.5; REQUIREMENTS TR-04, TR-11 verified in-date parents, EX-01 expiry capped
 * by every parent, EQ-01/EQ-02/EQ-04 balance gates, TR-08 original observations append-only, TR-09 stored results).
 *
 * Plan (chemist): from a target mass fraction w2 (mg/kg) and the planned true mass of the final solution m_f,
 * the aliquot of parent to weigh is m_a = w2·m_f/w1, with w1 the parent's mass fraction (gravimetric-calc). Each
 * true mass is turned into the balance reading to aim for, m' = m/B (METROLOGY §2.1; air density CIPM-2007 at the
 * lab's default room conditions), and the balance gates of shared/prep/gates.ts run on the aliquot reading
 * (out of service, calibration, USP <41> minimum weight). The record is a preparation of kind 'dilution' whose
 * plan.dilution.method is 'gravimetric'.
 * Bench (chemist, technician): both net readings as shown, with the room conditions; checked against the balance's
 * readability and minimum weight, stored at once (gravimetric_readings, append-only), and the result (mass
 * fraction and mass concentration with GUM budgets, rounded by the lab rule) is stored with the record in the same
 * write transaction (preparations.dilution_result).
 */
import { checkedCaptures, captureSummary } from './reading-capture.ts';
import type { StoredCapture } from '../../shared/balance/capture.ts';
import { CalcError, D } from '../../shared/calc/index.ts';
import { checkReadingDigits, checkReadingRange, evaluateGates, formatPreparationId, type Gate } from '../../shared/prep/index.ts';
import type { GravimetricPlan, GravimetricPlanInput, GravimetricReadingsInput, GravimetricResult, SourcedValue } from '../../shared/schemas/gravimetric.ts';
import type { Balance as BalanceDto } from '../../shared/schemas/inventory.ts';
import type { PreparationDetailWithLineage } from '../../shared/schemas/lineage.ts';
import type { ConditionsUsed } from '../../shared/schemas/preparations.ts';
import type { LabSettings } from '../../shared/schemas/settings.ts';
import type { StoredPlan } from '../db/models/index.ts';
import { Balance, GravimetricReading, MakeUp, Preparation, PreparationEvent, PreparationParent, Solvent } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import {
  activeReadings,
  airDensityOf,
  computeGravimetricResult,
  defaultSolutionDensity,
  enteredDensity,
  gravimetricPlanOf,
  gravimetricResultOf,
  GRAVIMETRIC_CALC_VERSION,
  isGravimetricPlan,
  massesFor,
  parentMassFractionOf,
  readingsOf,
} from './gravimetric-calc.ts';
import { expiryFor, isDilutionKind, lineageRow } from './lineage-view.ts';
import { findPreparationRow, nextSequence, usableParent } from './lineage.service.ts';
import { balanceSnapshot } from './preparation-snapshots.ts';
import { dataEntryMode } from './preparation-status.ts';
import { gateBalance, GateBlockedError, getPreparation, labDate, usableBalanceGates, type Actor, type WriteOptions } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';

/** The balance and weighing gates of shared/prep/gates.ts; the material gates belong to the parent's own plan. */
const BALANCE_GATE_CODES = new Set(['balance_out_of_service', 'calibration_due_unknown', 'calibration_overdue', 'calibration_due_soon', 'min_weight_unknown', 'below_min_weight']);

function labDefaultConditions(settings: LabSettings, now: Date): ConditionsUsed {
  return { source: 'lab-default', ...settings.defaultRoomConditions, measuredAt: now.toISOString() };
}

/**
 * evaluateGates on the aliquot reading, kept to the balance gates. The minimum-weight action is rewritten for a
 * gravimetric dilution: the aliquot scales with the final mass (the core's "minimum volume" is that mass in g).
 */
function aliquotGates(readingMg: string, balance: BalanceDto, others: BalanceDto[], finalMassG: string, today: string, parentMaterial: { name: string }): Gate[] {
  const gates = evaluateGates({
    today,
    plannedReadingMg: readingMg,
    balance: gateBalance(balance),
    otherBalances: others.filter((b) => b.status === 'in_service').map(gateBalance),
    material: { name: parentMaterial.name, status: 'accepted', expiresOn: '9999-12-31', purityValue: '1' },
    volumeMl: finalMassG,
    flaskOptions: [],
  }).filter((g) => BALANCE_GATE_CODES.has(g.code));
  return gates.map((g) => {
    if (g.code !== 'below_min_weight') return g;
    const alt = g.suggestion?.balanceIdentifier;
    const min = g.suggestion?.minimumVolumeMl;
    const action = [min ? `Plan a final mass of at least ${min} g (the aliquot scales with the final mass) or dilute from a less concentrated parent` : null, alt ? `weigh on ${alt}` : null].filter(Boolean).join('; or ');
    return { ...g, message: g.message.replace('Planned reading', 'The aliquot reading'), action };
  });
}

function gravimetricParentField(e: unknown, field: string): never {
  if (e instanceof CalcError) throw AppError.validation(e.message, { [field]: e.message });
  throw e;
}

/** POST /api/preparations/:key/gravimetric-dilutions (key = the parent). */
export async function createGravimetricDilution(parentKey: string, input: GravimetricPlanInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetailWithLineage> {
  const now = opts.now ?? new Date();
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const parentRow = await findPreparationRow(parentKey);
  const parent = await usableParent(parentRow, actor, settings, today, 'parent');
  if (input.solventId !== undefined && !(await Solvent.findByPk(input.solventId))) {
    throw AppError.validation(`No solvent with id ${input.solventId} is registered`, { solventId: `No solvent with id ${input.solventId} is registered` });
  }
  const b = await Balance.findByPk(input.balanceId);
  if (!b) throw AppError.validation(`No balance with id ${input.balanceId} is registered`, { balanceId: `No balance with id ${input.balanceId} is registered` });
  const balance = balanceSnapshot(b);
  const finalG = new D(input.plannedFinalMassG);
  if (finalG.gt(balance.capacityG)) {
    const msg = `${balance.identifier} weighs up to ${balance.capacityG} g; plan a final mass of at most ${balance.capacityG} g or choose a larger balance`;
    throw AppError.validation(msg, { plannedFinalMassG: msg });
  }
  const conditions = labDefaultConditions(settings, now);

  let air: SourcedValue, parentDensity: SourcedValue, finalDensity: SourcedValue, w1: SourcedValue;
  try {
    air = airDensityOf(conditions);
    parentDensity = input.parentDensity ? enteredDensity(input.parentDensity, 'Parent solution density') : defaultSolutionDensity(await makeUpTemperature(parentRow), 'Parent solution density');
    finalDensity = input.finalDensity ? enteredDensity(input.finalDensity, 'Final solution density') : defaultSolutionDensity(conditions.temperatureC, 'Final solution density');
  } catch (e) {
    gravimetricParentField(e, 'parentDensity');
  }
  const parentOwn = isGravimetricPlan(parentRow) ? (await gravimetricResultOf(parentRow, settings))?.massFraction ?? null : null;
  w1 = parentMassFractionOf(parent, parentDensity, parentOwn);
  const w2 = new D(input.target.value);
  if (w2.gte(w1.value)) {
    const msg = `${input.target.value} mg/kg is not below the parent's ${new D(w1.value).toSignificantDigits(5).toString()} mg/kg (${parent.identifier}), so it is not a dilution`;
    throw new AppError('target_not_reachable', 422, msg, { fields: { 'target.value': msg } });
  }
  const aliquotTrue = w2.mul(finalG).div(w1.value);
  const aliquot = massesFor(aliquotTrue, air.value, parentDensity.value, balance, settings.roundingRule);
  const final = massesFor(finalG, air.value, finalDensity.value, balance, settings.roundingRule);
  const readingMg = new D(aliquot.readingShownG).mul(1000).toFixed();
  const others = (await Balance.findAll({ order: [['identifier', 'ASC']] })).map(balanceSnapshot);
  const gates = [...aliquotGates(new D(readingMg).gt(0) ? readingMg : new D(balance.readabilityMg).toFixed(), balance, others, input.plannedFinalMassG, today, parentRow.snapshotMaterial)];
  if (gates.some((g) => g.severity === 'block')) throw new GateBlockedError(gates);

  const expected = computePlanned(w1, parentDensity, finalDensity, air, aliquot.readingG, final.readingG, balance, conditions, settings);
  const plan: GravimetricPlan = {
    method: 'gravimetric',
    target: { value: input.target.value, unit: 'mg/kg' },
    plannedFinalMassG: input.plannedFinalMassG,
    parentMassFraction: w1,
    parentDensity,
    finalDensity,
    airDensity: air,
    aliquot,
    final,
    planned: expected,
    calcVersion: GRAVIMETRIC_CALC_VERSION,
  };
  const expiry = expiryFor(
    { kind: 'dilution', analyteFormula: parent.analyteFormula, target: { value: expected.massConcentration.value, unit: 'mg/L' }, material: parentRow.snapshotMaterial, parents: [parent] },
    settings,
    today,
  );
  const at = now.toISOString();
  const id = await writeTransaction(async (transaction) => {
    const year = Number(today.slice(0, 4));
    const identifier = formatPreparationId(settings.idPrefix, year, await nextSequence(settings.idPrefix, year, transaction));
    const prep = await Preparation.create(
      {
        identifier,
        status: 'planned',
        version: 1,
        materialId: parentRow.materialId,
        analyteFormula: parent.analyteFormula,
        targetValue: input.target.value,
        targetUnit: 'mg/kg',
        volumeValue: input.plannedFinalMassG, // a gravimetric dilution is made up to a mass, not a volume
        volumeUnit: 'g',
        flaskId: null,
        balanceId: balance.id,
        inputs: { method: 'gravimetric', parentKey: parent.identifier, ...input } as unknown as Preparation['inputs'],
        notes: input.notes ? input.notes : null,
        conditionsUsed: conditions,
        snapshotMaterial: parentRow.snapshotMaterial,
        snapshotBalance: balance,
        snapshotFlask: null,
        plan: { kind: 'dilution', dilution: plan } as unknown as StoredPlan,
        gates,
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
    await Preparation.sequelize!.query("UPDATE preparations SET kind = 'dilution' WHERE id = :id", { replacements: { id: prep.id }, transaction });
    await PreparationParent.create({ preparationId: prep.id, parentPreparationId: parent.id, aliquotWareId: null, role: 'aliquot', plannedVolumeMl: null, snapshot: parent, createdAt: at }, { transaction });
    await PreparationEvent.create({ preparationId: prep.id, status: 'planned', note: input.notes ? input.notes : null, byId: actor.id, byName: actor.fullName, at }, { transaction });
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
            kind: 'dilution',
            method: 'gravimetric',
            status: 'planned',
            parent: `${parent.identifier} v${parent.version} (${parent.concentration.display}, expires ${parent.expiresOn})`,
            target: `${input.target.value} mg/kg`,
            balance: balance.identifier,
            aliquotReadingToAimForG: aliquot.readingShownG,
            finalReadingToAimForG: final.readingShownG,
            parentMassFraction: `${w1.value} mg/kg (${w1.basis})`,
            parentDensity: parentDensity.value,
            finalDensity: finalDensity.value,
            airDensity: air.value,
            plannedConcentration: `${expected.massFraction.display}; ${expected.massConcentration.display}`,
            warnings: gates.map((g) => g.code),
            expiresOn: expiry.expiresOn,
            expiryReason: expiry.reason,
          },
        ),
      },
      transaction,
    );
    return prep.id;
  });
  return (await getPreparation(String(id), actor.id)) as PreparationDetailWithLineage;
}

/** The expected result with the planned readings (the same core as the bench result, at the plan's conditions). */
function computePlanned(w1: SourcedValue, parentDensity: SourcedValue, finalDensity: SourcedValue, air: SourcedValue, aliquotReadingG: string, finalReadingG: string, balance: BalanceDto, conditions: ConditionsUsed, settings: LabSettings): GravimetricPlan['planned'] {
  const plan = { parentMassFraction: w1, parentDensity, finalDensity } as GravimetricPlan;
  const r = computeGravimetricResult(plan, { id: 0, unit: 'g', aliquotReading: aliquotReadingG, finalReading: finalReadingG, balanceSnapshot: balance, airDensity: air.value, airDensityU: air.standardUncertainty, conditions }, settings.roundingRule);
  return { massFraction: r.massFraction, massConcentration: r.massConcentration, buoyancyRatio: r.buoyancyRatio };
}

/** The parent's latest make-up solution temperature (°C), 20 when none is recorded. */
async function makeUpTemperature(parent: Preparation): Promise<string> {
  const m = await MakeUp.findOne({ where: { preparationId: parent.id }, order: [['id', 'DESC']] });
  return m?.solutionTemperatureC ?? '20';
}

// ------------------------------------------------------------------ the readings at the bench

/** POST /api/preparations/:key/gravimetric-readings: both net readings as shown; append-only; the result is stored. */
export async function recordGravimetricReadings(key: string, input: GravimetricReadingsInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetailWithLineage> {
  const now = opts.now ?? new Date();
  const prep = await findPreparationRow(key);
  const { kind } = await lineageRow(prep.id);
  if (!isDilutionKind(kind) || !isGravimetricPlan(prep)) {
    throw new AppError('not_gravimetric', 409, `${prep.identifier} is not a gravimetric dilution: ${isDilutionKind(kind) ? 'record its aliquot and make-up' : 'record a weighing'} instead`);
  }
  dataEntryMode(prep.identifier, prep.status); // 409 when expired or discarded
  if (prep.status !== 'planned') throw AppError.conflict(`${prep.identifier} is '${prep.status}': readings can be recorded or corrected only while the record is planned`);
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const b = await Balance.findByPk(prep.balanceId);
  if (!b) throw AppError.conflict(`The planned balance of ${prep.identifier} is no longer registered`);
  const balance = balanceSnapshot(b);
  const blocked = usableBalanceGates(balance, today);
  if (blocked.length) throw new GateBlockedError(blocked);

  const fields: Record<string, string> = {};
  // both are net readings: greater than zero and within the balance's capacity, or refused (422 at the field)
  const what = { aliquotReading: 'The aliquot reading', finalReading: 'The final solution reading' } as const;
  for (const f of ['aliquotReading', 'finalReading'] as const) {
    const range = checkReadingRange(input[f], input.unit, balance.capacityG, { net: true, balanceIdentifier: balance.identifier, what: what[f] });
    if (!range.ok) fields[f] = range.message;
  }
  if (Object.keys(fields).length) throw new AppError('reading_impossible', 422, Object.values(fields)[0]!, { fields });
  // digits as the balance shows them (checked, then stored verbatim)
  for (const f of ['aliquotReading', 'finalReading'] as const) {
    const check = checkReadingDigits(input[f], input.unit, balance.readabilityMg, balance.identifier);
    if (!check.ok) fields[f] = check.message;
  }
  if (Object.keys(fields).length) throw AppError.validation(Object.values(fields)[0]!, fields);
  // how each reading came in: a balance print is parsed again and must say what was sent (422 at the field)
  const captures = checkedCaptures([['aliquotReading', input.aliquotReading], ['finalReading', input.finalReading]] as const, input.captures, input.unit, balance, settings, now.toISOString());
  const aliquotMg = input.unit === 'g' ? new D(input.aliquotReading).mul(1000).toFixed() : input.aliquotReading;
  const minWeight = aliquotGates(aliquotMg, balance, [], prep.volumeValue, today, prep.snapshotMaterial).filter((g) => g.code === 'below_min_weight');
  if (minWeight.length) throw new GateBlockedError(minWeight);

  const conditions: ConditionsUsed = input.room
    ? { source: 'measured', temperatureC: input.room.temperatureC, pressureHPa: input.room.pressureHPa, relativeHumidityPct: input.room.humidityPct, measuredAt: now.toISOString() }
    : { source: 'lab-default', ...settings.defaultRoomConditions, measuredAt: now.toISOString() };
  let air: SourcedValue;
  try {
    air = airDensityOf(conditions);
  } catch (e) {
    if (e instanceof CalcError) throw AppError.validation(e.message, { room: e.message });
    throw e;
  }

  const existing = await readingsOf(prep.id);
  const active = activeReadings(existing);
  if (input.supersedesId === undefined && active) {
    throw AppError.conflict(`Readings ${active.id} are already recorded for ${prep.identifier}; to correct them, send supersedesId ${active.id} with a correctionReason`, { supersedesId: `Send supersedesId ${active.id} and a correctionReason to correct the recorded readings` });
  }
  if (input.supersedesId !== undefined) {
    if (!existing.some((r) => r.id === input.supersedesId)) throw AppError.validation(`Readings ${input.supersedesId} do not belong to ${prep.identifier}`, { supersedesId: `Readings ${input.supersedesId} do not belong to ${prep.identifier}` });
    if (active && active.id !== input.supersedesId) throw AppError.conflict(`Readings ${input.supersedesId} have already been superseded; correct the current readings ${active.id}`, { supersedesId: `Correct the current readings ${active.id}` });
  }
  const plan = gravimetricPlanOf(prep);
  // the result can be computed before anything is written (a CalcError is a 400 at the reading, nothing stored)
  computeGravimetricResult(plan, { id: 0, unit: input.unit, aliquotReading: input.aliquotReading, finalReading: input.finalReading, balanceSnapshot: balance, airDensity: air.value, airDensityU: air.standardUncertainty, conditions }, settings.roundingRule);

  const at = now.toISOString();
  await writeTransaction(async (transaction) => {
    const r = await GravimetricReading.create(
      {
        preparationId: prep.id,
        balanceId: balance.id,
        balanceSnapshot: balance,
        unit: input.unit,
        aliquotReading: input.aliquotReading,
        finalReading: input.finalReading,
        conditions,
        airDensity: air.value,
        airDensityU: air.standardUncertainty,
        supersedesId: input.supersedesId ?? null,
        correctionReason: input.supersedesId !== undefined ? input.correctionReason! : null,
        recordedBy: actor.id,
        recordedAt: at,
        captures: captures as Record<string, StoredCapture>,
      },
      { transaction },
    );
    const result: GravimetricResult = computeGravimetricResult(plan, r, settings.roundingRule);
    const before = { version: prep.version, concentration: prep.concentrationDisplay };
    prep.dilutionResult = result as unknown as Record<string, unknown>;
    prep.concentrationDisplay = result.display;
    prep.version = prep.version + 1;
    prep.updatedAt = at;
    await prep.save({ transaction });
    await recordAudit(
      {
        actor,
        action: 'gravimetric_readings_recorded',
        entity: 'gravimetric_readings',
        entityId: r.id,
        changes: [
          ...diffFields({}, { preparation: prep.identifier, balance: balance.identifier, unit: input.unit, aliquotReading: input.aliquotReading, finalReading: input.finalReading, conditions, airDensity: air.value, supersedesId: r.supersedesId, captures: captureSummary(captures) }),
          ...diffFields(before, { version: prep.version, concentration: prep.concentrationDisplay }).map((c) => ({ ...c, field: `preparation.${c.field}` })),
          { field: 'preparation.dilutionResult', oldValue: null, newValue: `${result.display} (${result.calcVersion}; readings ${r.id})` },
        ],
        reason: r.correctionReason,
      },
      transaction,
    );
  });
  return (await getPreparation(String(prep.id), actor.id)) as PreparationDetailWithLineage;
}
