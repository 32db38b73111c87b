/**
 * Lineage pieces the preparation journey calls (no import of preparations.service, so no import cycle):
 * the lineage section of a detail, the expiry of any preparation (stability rule + reference material +
 * every parent, REQUIREMENTS EX-01/EX-02), the guard that keeps weighings off volumetric dilutions, and the
 * recomputation of a dilution from its stored aliquot and make-up (METROLOGY §5.5).
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { D, rectangular, triangular } from '../../shared/calc/index.ts';
import { DILUTION_TEMPERATURE_HALF_WIDTH_C, repeatabilityFromTolerance, volumetricDilution, type DilutionResult } from '../../shared/calc/dilution.ts';
import { calibratedVolumeLabel, classATolerance, computeExpiry, twoDigits, type ExpiryResult } from '../../shared/prep/index.ts';
import { selectStabilityRule } from '../../shared/prep/stability-rules.ts';
import type { VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type { Aliquot, DilutionSection, LineageSection, ParentSnapshot, PreparationKind } from '../../shared/schemas/lineage.ts';
import { DEFAULT_STABILITY_BASIS, DEFAULT_STABILITY_DAYS, type LabSettings } from '../../shared/schemas/settings.ts';
import { DilutionAliquot, MakeUp, Preparation, PreparationParent, Series, Solvent, User } from '../db/models/index.ts';
import { solventMatrixWarning, type MatrixWarning } from '../../shared/prep/matrix.ts';
import { AppError } from '../errors/app-error.ts';
import { gravimetricResultOf, gravimetricSection, isGravimetricPlan } from './gravimetric-calc.ts';

/** The budget of dilutions written before dilution-2: the parent and the two tolerances only. */
export const DILUTION_CALC_VERSION_1 = 'dilution-1 (METROLOGY §5.5: c2 = c1·Vp/Vf, relative variances add, no per-item temperature term)';
/** Written from now on: the tolerances plus each item's repeatability and the aliquot-to-final temperature difference (shared/calc/dilution.ts header). */
export const DILUTION_CALC_VERSION =
  'dilution-2 (METROLOGY §5.5: c2 = c1·Vp/Vf·(1 + β·ΔT); tolerances, repeatability a/√6 from each tolerance, ΔT ±4 °C rectangular as QUAM A1)';

/**
 * kind and series of committed preparations, keyed on the database (Sequelize instance) and the preparation id.
 * Both are written once, in the transaction that creates the record (lineage.service), and never change after,
 * so an entry cannot go stale; reads inside a transaction bypass it. Dropped whole past 5000 ids, and with the
 * database.
 */
const lineageRows = new WeakMap<object, Map<number, { kind: PreparationKind; seriesId: number | null }>>();

export async function lineageRow(id: number, transaction?: Transaction): Promise<{ kind: PreparationKind; seriesId: number | null }> {
  const db = Preparation.sequelize!;
  const memo = lineageRows.get(db) ?? (lineageRows.set(db, new Map()), lineageRows.get(db)!);
  const hit = transaction ? undefined : memo.get(id);
  if (hit) return { ...hit };
  const row = await readLineageRow(id, transaction);
  if (!transaction && row) {
    if (memo.size >= 5000) memo.clear();
    memo.set(id, row);
  }
  return row ? { ...row } : { kind: 'stock', seriesId: null };
}

async function readLineageRow(id: number, transaction?: Transaction): Promise<{ kind: PreparationKind; seriesId: number | null } | null> {
  const rows = await Preparation.sequelize!.query<{ kind: string; series_id: number | null }>('SELECT kind, series_id FROM preparations WHERE id = :id', {
    replacements: { id },
    type: QueryTypes.SELECT,
    ...(transaction ? { transaction } : {}),
  });
  return rows[0] ? { kind: (rows[0].kind ?? 'stock') as PreparationKind, seriesId: rows[0].series_id ?? null } : null;
}

export const isDilutionKind = (k: string) => k === 'dilution' || k === 'series_level';

/** Written instead of dilution-2 when a calibrated volume was used (lab setting useCalibratedVolumes); same six rows. */
export const DILUTION_CALC_VERSION_CALIBRATED =
  'dilution-3 (dilution-2 with the calibrated volume of checked ware: V = mean at 20 °C, u = U/k, repeatability s of the volume check; METROLOGY §5.5)';

/**
 * Standard uncertainty of a pipette's delivered volume: from the calibrated volume frozen in the snapshot (u = U/k
 * of its volume check), else from its tolerance (bulb: triangular, QUAM A1; piston: rectangular, ISO 8655 MPE).
 */
export function pipetteUncertainty(w: WareDto): { standardUncertainty: string; basis: string } | null {
  if (w.calibratedVolume) return { standardUncertainty: w.calibratedVolume.standardUncertaintyMl, basis: `calibrated, ${w.calibratedVolume.checkIdentifier}` };
  const tol = w.toleranceMl ?? (w.class === 'A' && w.kind === 'bulb_pipette' ? classATolerance('pipette', w.nominalVolumeMl)?.toleranceMl : undefined);
  if (!tol) return null;
  if (w.kind === 'piston_pipette') return { standardUncertainty: rectangular(tol).toSignificantDigits(20).toFixed(), basis: `tolerance ±${tol} mL of ${w.identifier}, rectangular` };
  return { standardUncertainty: triangular(tol).toSignificantDigits(20).toFixed(), basis: `tolerance ±${tol} mL of ${w.identifier}, triangular` };
}

/** Flask volume u from its tolerance (triangular, QUAM A1), class A table when none is recorded (METROLOGY §4.4). */
export function flaskUncertainty(w: WareDto): { standardUncertainty: string; basis: string } | null {
  if (w.calibratedVolume) return { standardUncertainty: w.calibratedVolume.standardUncertaintyMl, basis: `calibrated, ${w.calibratedVolume.checkIdentifier}` };
  const tol = w.toleranceMl ?? (w.class === 'A' ? classATolerance('flask', w.nominalVolumeMl)?.toleranceMl : undefined);
  if (!tol) return null;
  return { standardUncertainty: triangular(tol).toSignificantDigits(20).toFixed(), basis: `tolerance ±${tol} mL of ${w.identifier}, triangular` };
}

/** The tolerance a pipette's or flask's u is taken from (recorded, else the class A table). */
function toleranceOf(w: WareDto, kind: 'pipette' | 'flask'): string | undefined {
  if (w.toleranceMl) return w.toleranceMl;
  if (w.class !== 'A') return undefined;
  if (kind === 'pipette' && w.kind !== 'bulb_pipette') return undefined;
  return classATolerance(kind, w.nominalVolumeMl)?.toleranceMl;
}

/**
 * A volumetric dilution's result. With `fuller` (dilution-2, every record written from now on) the budget also
 * holds each item's repeatability and the temperature difference between aliquot and final solution, with the
 * final solution's β; without it (dilution-1) only the parent and the two tolerances, as records written before.
 */
export function dilutionOf(parent: ParentSnapshot, aliquotMl: string, pipette: WareDto, flask: WareDto, rounding: LabSettings['roundingRule'], fuller?: { betaPerK: string; betaSource: string }): DilutionResult {
  const up = pipetteUncertainty(pipette);
  const uf = flaskUncertainty(flask);
  if (!up || !uf) throw AppError.validation(`${!up ? pipette.identifier : flask.identifier} has no tolerance recorded`);
  // a calibrated volume (frozen in the snapshot) replaces the nominal volume and the tolerance, and its check's s
  // replaces the repeatability taken from the tolerance (the lab's own fill-and-weigh s, shared/calc/dilution.ts header)
  const cp = pipette.calibratedVolume && new D(pipette.calibratedVolume.volumeMl).eq(aliquotMl) ? pipette.calibratedVolume : undefined;
  const cf = flask.calibratedVolume;
  const tp = toleranceOf(pipette, 'pipette');
  const tf = toleranceOf(flask, 'flask');
  if (!cp && pipette.calibratedVolume) throw AppError.validation(`${pipette.identifier} was calibrated at ${pipette.calibratedVolume.volumeMl} mL, not at ${aliquotMl} mL`);
  return volumetricDilution({
    parent: { value: parent.concentration.value, unit: parent.concentration.unit, standardUncertainty: parent.concentration.standardUncertainty },
    aliquot: { volumeMl: cp ? cp.meanMl : aliquotMl, standardUncertainty: up.standardUncertainty, distribution: cp ? 'normal' : pipette.kind === 'piston_pipette' ? 'rectangular' : 'triangular', ...(cp ? { label: calibratedVolumeLabel('Aliquot volume', cp) } : {}) },
    final: { volumeMl: cf ? cf.meanMl : flask.nominalVolumeMl, standardUncertainty: uf.standardUncertainty, distribution: cf ? 'normal' : 'triangular', ...(cf ? { label: calibratedVolumeLabel('Flask volume', cf) } : {}) },
    ...(fuller
      ? {
          repeatability: {
            aliquotMl: cp ? cp.repeatabilitySdMl : repeatabilityFromTolerance(tp!).toSignificantDigits(20).toFixed(),
            finalMl: cf ? cf.repeatabilitySdMl : repeatabilityFromTolerance(tf!).toSignificantDigits(20).toFixed(),
            aliquotLabel: cp
              ? `Aliquot repeatability (s = ${twoDigits(cp.repeatabilitySdMl)} mL of single deliveries in ${cp.checkIdentifier})`
              : `Aliquot repeatability (from the ±${tp} mL tolerance of ${pipette.identifier}, triangular a/√6; common practice)`,
            finalLabel: cf
              ? `Flask filling repeatability (s = ${twoDigits(cf.repeatabilitySdMl)} mL of fills to the mark in ${cf.checkIdentifier})`
              : `Flask filling repeatability (from the ±${tf} mL tolerance of ${flask.identifier}, triangular a/√6; common practice)`,
            // one distribution for both rows: triangular from tolerances; a check's s is taken as normal when either is calibrated
            distribution: cp || cf ? 'normal' : 'triangular',
          },
          temperature: {
            betaPerK: fuller.betaPerK,
            standardUncertaintyC: rectangular(DILUTION_TEMPERATURE_HALF_WIDTH_C).toSignificantDigits(20).toFixed(),
            label: `Temperature difference, aliquot to final solution (0 ± ${DILUTION_TEMPERATURE_HALF_WIDTH_C} °C rectangular, QUAM A1; β = ${fuller.betaPerK} /K, ${fuller.betaSource})`,
          },
        }
      : {}),
    rounding,
  });
}

/** β for the fuller budget: the make-up solvent's, else water's 2.1 × 10⁻⁴ /K (QUAM A1) as the stock uses. */
export function dilutionBeta(solvent: { name: string; expansionCoefficientPerK?: string | null } | null | undefined): { betaPerK: string; betaSource: string } {
  if (solvent?.expansionCoefficientPerK) return { betaPerK: solvent.expansionCoefficientPerK, betaSource: `of ${solvent.name}` };
  return { betaPerK: '0.00021', betaSource: 'water, QUAM A1' };
}

/** The newest aliquot that no other aliquot supersedes. */
export function activeAliquot(rows: DilutionAliquot[]): DilutionAliquot | undefined {
  const superseded = new Set(rows.map((a) => a.supersedesId).filter((x): x is number => x !== null));
  return rows.filter((a) => !superseded.has(a.id)).at(-1);
}

/** A volumetric dilution's result as stored (migration 0011) and shown: the core's answer + calcVersion + basedOn. */
export type VolumetricDilutionResult = NonNullable<DilutionSection['result']>;

/**
 * A dilution's result (null until its aliquot and make-up exist). The result stored at the write that made it
 * (storeDilutionResult) is returned when its basedOn names the current aliquot and make-up, so a later change of
 * the lab's rounding rule cannot change a signed record; rows without a stored result (legacy) are computed.
 */
export async function dilutionResultOf(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>, transaction?: Transaction, forWrite = false): Promise<VolumetricDilutionResult | null> {
  if (isGravimetricPlan(p)) return null; // a gravimetric dilution's result: gravimetricResultOf (gravimetric-calc)
  const t = transaction ? { transaction } : {};
  const [link, aliquots, makeUp] = await Promise.all([
    PreparationParent.findOne({ where: { preparationId: p.id, role: 'aliquot' }, ...t }),
    DilutionAliquot.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], ...t }),
    MakeUp.findOne({ where: { preparationId: p.id }, order: [['id', 'DESC']], ...t }),
  ]);
  const a = activeAliquot(aliquots);
  if (!link || !a || !makeUp || !link.snapshot.concentration) return null;
  const stored = p.dilutionResult as VolumetricDilutionResult | null | undefined;
  if (stored && stored.basedOn && stored.basedOn.aliquotId === a.id && stored.basedOn.makeUpId === makeUp.id) return stored;
  // Old records keep their budget: a result is computed with the fuller budget (dilution-2) only at the write that
  // stores it (storeDilutionResult). A row read without a stored result was written before results were stored
  // (migration 0011), hence before dilution-2, and is computed as it was then (dilution-1), so neither its number
  // nor its signed hash moves (tests/server/dilution-budget-version.test.ts).
  if (!forWrite) {
    const r1 = dilutionOf(link.snapshot, a.volumeMl, a.pipetteSnapshot, makeUp.flaskSnapshot, settings.roundingRule);
    return { ...r1, calcVersion: DILUTION_CALC_VERSION_1, basedOn: { aliquotId: a.id, makeUpId: makeUp.id } };
  }
  const r = dilutionOf(link.snapshot, a.volumeMl, a.pipetteSnapshot, makeUp.flaskSnapshot, settings.roundingRule, dilutionBeta(makeUp.solventSnapshot));
  const calibrated = Boolean(a.pipetteSnapshot.calibratedVolume || makeUp.flaskSnapshot.calibratedVolume);
  return { ...r, calcVersion: calibrated ? DILUTION_CALC_VERSION_CALIBRATED : DILUTION_CALC_VERSION, basedOn: { aliquotId: a.id, makeUpId: makeUp.id } };
}

/**
 * Inside the write transaction of an aliquot or make-up (after the new row is created): compute the dilution's
 * result from the stored rows and keep it on the record (dilution_result, concentrationDisplay). Does not save;
 * returns the audit changes. A stock (or a dilution still missing its aliquot or make-up) is left as it is.
 */
export async function storeDilutionResult(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>, transaction: Transaction): Promise<Array<{ field: string; oldValue: unknown; newValue: unknown }>> {
  const { kind } = await lineageRow(p.id, transaction);
  if (kind === 'mix') return (await import('./mix-view.ts')).storeMixResults(p, settings, transaction); // every component's result
  if (!isDilutionKind(kind)) return [];
  const result = await dilutionResultOf(p, settings, transaction, true);
  if (!result) return [];
  const before = p.concentrationDisplay;
  p.dilutionResult = result as unknown as Record<string, unknown>;
  p.concentrationDisplay = result.display;
  const out: Array<{ field: string; oldValue: unknown; newValue: unknown }> = [{ field: 'dilutionResult', oldValue: null, newValue: `${result.display} (${result.calcVersion}; aliquot ${result.basedOn.aliquotId}, make-up ${result.basedOn.makeUpId})` }];
  if (before !== result.display) out.push({ field: 'concentration', oldValue: before, newValue: result.display });
  return out;
}

/** The concentration of a preparation as a parent: a stock's stored result, a dilution's stored (or, legacy, recomputed) result. */
export async function concentrationOf(p: Preparation, kind: PreparationKind, settings: Pick<LabSettings, 'roundingRule'>): Promise<ParentSnapshot['concentration'] | null> {
  if (isDilutionKind(kind) && isGravimetricPlan(p)) {
    const g = (await gravimetricResultOf(p, settings))?.massConcentration; // as a parent: its mass concentration (mg/L)
    return g ? { value: g.value, unit: g.unit, standardUncertainty: g.standardUncertainty, display: g.display } : null;
  }
  if (isDilutionKind(kind)) {
    const r = await dilutionResultOf(p, settings);
    return r ? { value: r.value, unit: r.unit, standardUncertainty: r.standardUncertainty, display: r.display } : null;
  }
  const c = p.result?.concentration;
  return c ? { value: c.value, unit: c.unit, standardUncertainty: c.standardUncertainty, display: c.display } : null;
}

/**
 * Expiry of any preparation: preparedOn + the applicable stability rule (basis recorded), capped by the
 * reference material's expiry and every parent's expiry at use. Stocks without rules keep the lab default.
 */
export async function lineageExpiry(p: Preparation, settings: LabSettings, preparedOn: string, transaction?: Transaction): Promise<ExpiryResult> {
  const { kind } = await lineageRow(p.id, transaction);
  const parents = await PreparationParent.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], ...(transaction ? { transaction } : {}) });
  return expiryFor({ kind, analyteFormula: p.analyteFormula, target: { value: p.targetValue, unit: p.targetUnit }, material: p.snapshotMaterial, parents: parents.map((x) => x.snapshot) }, settings, preparedOn);
}

export function expiryFor(
  s: { kind: PreparationKind; analyteFormula: string; target: { value: string; unit: string }; material: { name: string; lot: string; expiresOn?: string | null }; parents: Array<Pick<ParentSnapshot, 'identifier' | 'expiresOn'>> },
  settings: LabSettings,
  preparedOn: string,
): ExpiryResult {
  const rule = selectStabilityRule(settings.stabilityRules, { kind: s.kind, analyteFormula: s.analyteFormula, concentration: s.target }, {
    days: settings.defaultStabilityDays ?? DEFAULT_STABILITY_DAYS,
    basis: settings.defaultStabilityBasis ?? DEFAULT_STABILITY_BASIS,
  });
  // stocks with no rules: exactly the basis text the plan has always stored
  const basis = rule.ruleId === undefined && !settings.stabilityRules?.length ? (settings.defaultStabilityBasis ?? DEFAULT_STABILITY_BASIS) : rule.basis;
  return computeExpiry({
    preparedOn,
    stabilityDays: rule.days,
    stabilityBasis: basis,
    ...(s.material.expiresOn ? { materialExpiresOn: s.material.expiresOn } : {}),
    materialIdentifier: `${s.material.name} lot ${s.material.lot}`,
    parents: s.parents.map((x) => ({ identifier: x.identifier, expiresOn: x.expiresOn })),
  });
}

/** 409 for a weighing on a volumetric dilution: it has an aliquot and a make-up, nothing to weigh. */
export async function assertWeighable(p: Preparation): Promise<void> {
  const { kind } = await lineageRow(p.id);
  if (kind === 'mix') throw new AppError('not_weighable', 409, `${p.identifier} is a mix: record each component's aliquot (POST /api/preparations/${p.identifier}/aliquots with its componentId) and the make-up; there is nothing to weigh`);
  if (isDilutionKind(kind) && isGravimetricPlan(p)) {
    throw new AppError('not_weighable', 409, `${p.identifier} is a gravimetric dilution: record both readings (POST /api/preparations/${p.identifier}/gravimetric-readings)`);
  }
  if (isDilutionKind(kind)) {
    throw new AppError('not_weighable', 409, `${p.identifier} is a volumetric dilution: record the aliquot (POST /api/preparations/${p.identifier}/aliquots) and the make-up; there is nothing to weigh`);
  }
}

function aliquotDto(a: DilutionAliquot, supersededBy: Map<number, number>, users: Map<number, User>): Aliquot {
  const dto: Aliquot = {
    id: a.id,
    pipette: { id: a.pipetteId, identifier: a.pipetteIdentifier, snapshot: a.pipetteSnapshot },
    volumeMl: a.volumeMl,
    recordedBy: { id: a.recordedBy, fullName: users.get(a.recordedBy)?.fullName ?? `user ${a.recordedBy}` },
    recordedAt: a.recordedAt,
  };
  if (a.supersedesId !== null) dto.supersedesId = a.supersedesId;
  const by = supersededBy.get(a.id);
  if (by !== undefined) dto.supersededById = by;
  if (a.correctionReason) dto.correctionReason = a.correctionReason;
  return dto;
}

/** The lineage section of GET /api/preparations/:key. */
/** The dilution's solvent (its latest make-up, else the solvent planned) against the parent's latest make-up. */
export async function matrixWarningOf(p: Preparation, parentId: number, parentIdentifier: string): Promise<MatrixWarning | null> {
  const [own, parentMakeUp] = await Promise.all([
    MakeUp.findOne({ where: { preparationId: p.id }, order: [['id', 'DESC']] }),
    MakeUp.findOne({ where: { preparationId: parentId }, order: [['id', 'DESC']] }),
  ]);
  let name = own?.solventSnapshot?.name ?? null;
  const plannedId = (p.inputs as unknown as { solventId?: number }).solventId;
  if (!name && plannedId !== undefined) name = (await Solvent.findByPk(plannedId))?.name ?? null;
  return solventMatrixWarning({ identifier: parentIdentifier, solventName: parentMakeUp?.solventSnapshot?.name ?? null }, name);
}

export async function lineageSection(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>): Promise<LineageSection> {
  const { kind, seriesId } = await lineageRow(p.id);
  const childLinks = await PreparationParent.findAll({ where: { parentPreparationId: p.id }, order: [['id', 'ASC']] });
  const childRows = childLinks.length ? await Preparation.findAll({ where: { id: childLinks.map((c) => c.preparationId) }, order: [['id', 'ASC']] }) : [];
  const children = await Promise.all(childRows.map(async (c) => ({ id: c.id, identifier: c.identifier, kind: (await lineageRow(c.id)).kind, status: c.status })));
  const section: LineageSection = { kind, children };
  if (kind === 'mix') {
    const mix = await (await import('./mix-view.ts')).mixSection(p, settings);
    return mix ? { ...section, mix } : section;
  }
  if (!isDilutionKind(kind)) return section;
  if (isGravimetricPlan(p)) {
    const gravimetric = await gravimetricSection(p, settings);
    return gravimetric ? { ...section, gravimetric } : section;
  }
  const link = await PreparationParent.findOne({ where: { preparationId: p.id, role: 'aliquot' } });
  if (!link) return section;
  const planEarly = p.plan as unknown as { dilution?: unknown };
  if (!planEarly.dilution) return section;
  const aliquots = await DilutionAliquot.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] });
  const users = new Map((await User.findAll({ where: { id: [...new Set(aliquots.map((a) => a.recordedBy))] } })).map((u) => [u.id, u]));
  const supersededBy = new Map<number, number>();
  for (const a of aliquots) if (a.supersedesId !== null) supersededBy.set(a.supersedesId, a.id);
  const plan = p.plan as unknown as { dilution?: { pipette: WareDto; aliquotMl: string; finalMl: string; planned: DilutionResult } };
  // a row linked to a parent without a stored dilution plan (e.g. recorded by another path) has no dilution section
  if (!plan.dilution) return section;
  const dilution: DilutionSection = {
    method: 'volumetric',
    parent: { id: link.parentPreparationId, identifier: link.snapshot.identifier, snapshot: link.snapshot },
    plannedAliquot: { pipette: { id: plan.dilution.pipette.id, identifier: plan.dilution.pipette.identifier, snapshot: plan.dilution.pipette }, volumeMl: plan.dilution.aliquotMl },
    plannedFinalMl: plan.dilution.finalMl,
    planned: plan.dilution.planned,
    aliquots: aliquots.map((a) => aliquotDto(a, supersededBy, users)),
  };
  const result = await dilutionResultOf(p, settings);
  if (result) dilution.result = result;
  const warning = await matrixWarningOf(p, link.parentPreparationId, link.snapshot.identifier);
  if (warning) dilution.matrixWarning = warning;
  if (seriesId !== null) {
    const s = await Series.findByPk(seriesId);
    if (s) dilution.series = { id: s.id, identifier: s.identifier };
  }
  return { ...section, dilution };
}
