/**
 * Mixes: several parent standards pipetted into one flask (REQUIREMENTS TR-04 genealogy, TR-11 only verified in-date
 * parents, EX-01 expiry capped by every parent; METROLOGY §5.5 volumetric dilution per component).
 * Parent standards only: a mix weighed from several solid reference materials is not built.
 *
 * A mix is a preparation of its own (kind 'mix', own identifier from the lab's sequence) with one preparation_parents
 * row per component (role 'component': its pipette, planned volume and a frozen snapshot of the parent), its aliquots
 * at the bench (one append-only dilution_aliquots row per delivery, parent_link_id = the component; a correction is a
 * new row) and the ordinary make-up. The NOT NULL stock columns are filled from the first component's parent
 * (material id, balance, conditions; no weighing is made); the material snapshot is the components' materials
 * merged (names, lots and certificates joined, GHS hazards united, so the hazard cautions cover every analyte;
 * purity and density are the first material's and mean nothing for the mix). The target columns hold the first
 * analyte's planned concentration; the concentration display lists every analyte once the results exist.
 */
import type { Transaction } from 'sequelize';
import { CalcError, D } from '../../shared/calc/index.ts';
import { formatPreparationId } from '../../shared/prep/index.ts';
import type { ReferenceMaterial as MaterialDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type { AliquotInput, MixInput, ParentSnapshot, PreparationDetailWithLineage } from '../../shared/schemas/lineage.ts';
import type { StoredPlan } from '../db/models/index.ts';
import { DilutionAliquot, Preparation, PreparationEvent, PreparationParent, Solvent, VolumetricWare } from '../db/models/index.ts';
import { diffFields, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { dataEntryMode } from './preparation-status.ts';
import { wareSnapshot } from './preparation-snapshots.ts';
import { getPreparation, labDate, type Actor, type WriteOptions } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';
import { activeAliquot, dilutionOf, expiryFor, pipetteUncertainty } from './lineage-view.ts';
import { assertFlaskFree } from './flask-occupancy.ts';
import { aliquotVolume, findPreparationRow, flaskFor, nextSequence, pipetteFor, usableParent } from './lineage.service.ts';
import { mixPlanOf, storeMixResults, type MixPlan, type MixPlanComponent } from './mix-view.ts';

const unique = <T>(xs: T[]) => [...new Set(xs)];

/** The components' reference materials as one snapshot (see the header); expiry left to the parents. */
function mergedMaterial(materials: MaterialDto[]): MaterialDto {
  const first = materials[0]!;
  const join = (xs: Array<string | null | undefined>) => unique(xs.map((x) => x ?? '—')).join(' + ');
  return {
    ...first,
    name: `Mix: ${join(materials.map((m) => m.name))}`,
    formula: join(materials.map((m) => m.formula)),
    lot: join(materials.map((m) => m.lot)),
    certificateNumber: join(materials.map((m) => m.certificateNumber)),
    casNumber: join(materials.map((m) => m.casNumber)),
    grade: join(materials.map((m) => m.grade)),
    producer: join(materials.map((m) => m.producer)),
    catalogueNumber: join(materials.map((m) => m.catalogueNumber)),
    ghsHazardStatements: unique(materials.flatMap((m) => m.ghsHazardStatements ?? [])),
    ghsPictograms: unique(materials.flatMap((m) => m.ghsPictograms ?? [])),
    storage: join(materials.map((m) => m.storage)),
    // every parent's expiry is already capped by its own material (expiryFor), so the parents carry it
    expiresOn: null,
  } as MaterialDto;
}

/** POST /api/mixes (chemist). */
export async function createMix(input: MixInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetailWithLineage> {
  const now = opts.now ?? new Date();
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);

  // parents: each verified and in date (refusals audited, 422 at the component's field), distinct analytes
  const rows: Preparation[] = [];
  const parents: ParentSnapshot[] = [];
  for (const [i, c] of input.components.entries()) {
    const field = `components.${i}.parentKey`;
    const row = await findPreparationRow(c.parentKey, field);
    const parent = await usableParent(row, actor, settings, today, field);
    const j = parents.findIndex((p) => p.analyteFormula === parent.analyteFormula);
    if (j >= 0) {
      const msg = `${parent.identifier} is ${parent.analyteFormula}, like component ${j + 1} (${parents[j]!.identifier}): each analyte can be in a mix once`;
      throw AppError.validation(`${parent.analyteFormula} is in the mix twice`, { [field]: msg });
    }
    rows.push(row);
    parents.push(parent);
  }

  // glassware: in service with tolerances; the aliquots must fit the flask
  const flask = await flaskFor(input.flaskId, 'flaskId');
  await assertFlaskFree(flask, 'flaskId', today); // one flask, one open solution (flask-occupancy.ts)
  const pipettes: WareDto[] = [];
  const volumes: string[] = [];
  for (const [i, c] of input.components.entries()) {
    const pipette = await pipetteFor(c.pipetteId, `components.${i}.pipetteId`);
    pipettes.push(pipette);
    volumes.push(aliquotVolume(pipette, c.aliquotMl, `components.${i}.aliquotMl`));
  }
  const total = volumes.reduce((s, v) => s.plus(v), new D(0));
  if (total.gte(flask.nominalVolumeMl)) {
    const msg = `The aliquots add up to ${total.toString()} mL, which does not fit the ${flask.nominalVolumeMl} mL flask ${flask.identifier}: choose a larger flask or smaller aliquots`;
    throw AppError.validation(msg, { flaskId: msg });
  }
  if (input.solventId !== undefined && !(await Solvent.findByPk(input.solventId))) {
    throw AppError.validation(`No solvent with id ${input.solventId} is registered`, { solventId: `No solvent with id ${input.solventId} is registered` });
  }

  // each analyte's planned concentration and budget (METROLOGY §5.5)
  const components: MixPlanComponent[] = parents.map((parent, i) => {
    try {
      return { parentId: parent.id, parentIdentifier: parent.identifier, analyteFormula: parent.analyteFormula, pipette: pipettes[i]!, aliquotMl: volumes[i]!, planned: dilutionOf(parent, volumes[i]!, pipettes[i]!, flask, settings.roundingRule) };
    } catch (e) {
      if (e instanceof CalcError) throw AppError.validation(e.message, { [`components.${i}.aliquotMl`]: e.message });
      throw e;
    }
  });

  const first = rows[0]!;
  const analyteFormula = parents.map((p) => p.analyteFormula).join('+');
  const target = { value: new D(components[0]!.planned.value).toSignificantDigits(6).toString(), unit: components[0]!.planned.unit };
  const material = mergedMaterial(rows.map((r) => r.snapshotMaterial));
  const expiry = expiryFor({ kind: 'mix', analyteFormula, target, material, parents }, settings, today);
  const at = now.toISOString();

  const id = await writeTransaction(async (transaction: Transaction) => {
    const year = Number(today.slice(0, 4));
    const identifier = formatPreparationId(settings.idPrefix, year, await nextSequence(settings.idPrefix, year, transaction));
    const plan: MixPlan = { kind: 'mix', mix: { finalMl: flask.nominalVolumeMl, flask, components } };
    const inputs = {
      method: 'mix',
      components: input.components.map((c, i) => ({ parentKey: parents[i]!.identifier, pipetteId: c.pipetteId, aliquotMl: volumes[i]! })),
      flaskId: flask.id,
      ...(input.solventId !== undefined ? { solventId: input.solventId } : {}),
    };
    const prep = await Preparation.create(
      {
        identifier,
        status: 'planned',
        version: 1,
        materialId: first.materialId,
        analyteFormula,
        targetValue: target.value,
        targetUnit: target.unit,
        volumeValue: flask.nominalVolumeMl,
        volumeUnit: 'mL',
        flaskId: flask.id,
        balanceId: first.balanceId,
        inputs: inputs as unknown as Preparation['inputs'],
        notes: input.notes ? input.notes : null,
        conditionsUsed: first.conditionsUsed,
        snapshotMaterial: material,
        snapshotBalance: first.snapshotBalance,
        snapshotFlask: flask,
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
    await Preparation.sequelize!.query("UPDATE preparations SET kind = 'mix' WHERE id = :id", { replacements: { id: prep.id }, transaction });
    for (const [i, parent] of parents.entries()) {
      await PreparationParent.create({ preparationId: prep.id, parentPreparationId: parent.id, aliquotWareId: pipettes[i]!.id, role: 'component', plannedVolumeMl: volumes[i]!, snapshot: parent, createdAt: at }, { transaction });
    }
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
            kind: 'mix',
            status: 'planned',
            components: components.map((c, i) => `${c.analyteFormula}: ${c.aliquotMl} mL of ${c.parentIdentifier} v${parents[i]!.version} (${parents[i]!.concentration.display}, expires ${parents[i]!.expiresOn}) with ${c.pipette.identifier} → ${c.planned.display}`),
            flask: flask.identifier,
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

/**
 * POST /api/preparations/:key/aliquots for a mix (called by lineage.service recordAliquot): the aliquot of one
 * component (componentId = its preparation_parents id), pipette confirmed by identifier; append-only per component.
 */
export async function recordMixAliquot(prep: Preparation, input: AliquotInput, actor: Actor, opts: WriteOptions = {}): Promise<PreparationDetailWithLineage> {
  const now = opts.now ?? new Date();
  dataEntryMode(prep.identifier, prep.status); // 409 when expired or discarded
  if (prep.status !== 'planned') {
    throw AppError.conflict(`${prep.identifier} is '${prep.status}': aliquots can be recorded or corrected only while the record is planned`);
  }
  const plan = mixPlanOf(prep);
  if (!plan) throw AppError.conflict(`${prep.identifier} has no mix plan`);
  const links = await PreparationParent.findAll({ where: { preparationId: prep.id, role: 'component' }, order: [['id', 'ASC']] });
  const choices = links.map((l) => `${l.id} (${l.snapshot.analyteFormula} from ${l.snapshot.identifier})`).join(', ');
  if (input.componentId === undefined) throw AppError.validation(`${prep.identifier} is a mix: say which component the aliquot is for`, { componentId: `Choose the component: ${choices}` });
  const link = links.find((l) => l.id === input.componentId);
  if (!link) throw AppError.validation(`Component ${input.componentId} is not part of ${prep.identifier}`, { componentId: `Component ${input.componentId} is not part of ${prep.identifier}; choose one of ${choices}` });
  const planned = plan.components.find((c) => c.parentId === link.parentPreparationId)!;

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

  const all = await DilutionAliquot.findAll({ where: { preparationId: prep.id }, order: [['id', 'ASC']] });
  const existing = all.filter((a) => a.parentLinkId === link.id);
  const active = activeAliquot(existing);
  const what = `${planned.analyteFormula} (component ${link.id})`;
  if (input.supersedesId === undefined && active) {
    throw AppError.conflict(`Aliquot ${active.id} is already recorded for ${what} of ${prep.identifier}; to correct it, send supersedesId ${active.id} with a correctionReason`, { supersedesId: `Send supersedesId ${active.id} and a correctionReason to correct the recorded aliquot` });
  }
  if (input.supersedesId !== undefined) {
    if (!existing.some((a) => a.id === input.supersedesId)) throw AppError.validation(`Aliquot ${input.supersedesId} does not belong to ${what} of ${prep.identifier}`, { supersedesId: `Aliquot ${input.supersedesId} does not belong to ${what} of ${prep.identifier}` });
    if (active && active.id !== input.supersedesId) throw AppError.conflict(`Aliquot ${input.supersedesId} has already been superseded; correct the current aliquot ${active.id}`, { supersedesId: `Correct the current aliquot ${active.id}` });
    if (!input.correctionReason) throw AppError.validation('A correction needs a reason', { correctionReason: 'Give the reason for the correction' });
  }
  // with this aliquot in place of the component's current one, the aliquots must still fit the flask
  const others = links.filter((l) => l.id !== link.id).map((l) => activeAliquot(all.filter((a) => a.parentLinkId === l.id))?.volumeMl ?? '0');
  const total = others.reduce((s, v) => s.plus(v), new D(volumeMl));
  if (total.gte(plan.finalMl)) {
    throw AppError.validation(`The aliquots would add up to ${total.toString()} mL`, { volumeMl: `With this aliquot the mix's aliquots add up to ${total.toString()} mL, which does not fit the ${plan.finalMl} mL flask` });
  }

  const settings = await getSettings();
  const at = now.toISOString();
  await writeTransaction(async (transaction) => {
    const a = await DilutionAliquot.create(
      {
        preparationId: prep.id,
        parentLinkId: link.id,
        pipetteId: pipette.id,
        pipetteIdentifier: pipette.identifier,
        pipetteSnapshot: pipette,
        volumeMl,
        supersedesId: input.supersedesId ?? null,
        correctionReason: input.supersedesId !== undefined ? input.correctionReason! : null,
        recordedBy: actor.id,
        recordedAt: at,
      },
      { transaction },
    );
    const before = { version: prep.version, concentration: prep.concentrationDisplay };
    const stored = await storeMixResults(prep, settings, transaction);
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
          ...diffFields({}, { preparation: prep.identifier, component: `${planned.analyteFormula} from ${planned.parentIdentifier}`, pipette: pipette.identifier, substituted: pipette.identifier !== planned.pipette.identifier, volumeMl, supersedesId: a.supersedesId }),
          ...diffFields(before, { version: prep.version, concentration: prep.concentrationDisplay }).map((c) => ({ ...c, field: `preparation.${c.field}` })),
          ...stored.filter((c) => c.field === 'mixResults').map((c) => ({ ...c, field: `preparation.${c.field}` })),
        ],
        reason: a.correctionReason,
      },
      transaction,
    );
  });
  return (await getPreparation(String(prep.id), actor.id)) as PreparationDetailWithLineage;
}
