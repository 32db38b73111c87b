/**
 * Cautions of a preparation, chosen by its task (shared/prep/cautions.ts): a stock weighs the solid reference
 * material; a dilution, series level or mix pipettes a solution; a dilution by mass weighs one. The solvents named
 * are the record's make-up solvent (else the one planned) and, for a record made from parents, the matrix each
 * parent was made up in (the aliquot brings it along). The texts never replace the SDS: `sdsNote` says so once.
 */
import { cautionsFor, SDS_NOTE, type PrepTask, type TaskHazards } from '../../shared/prep/cautions.ts';
import { MakeUp, PreparationParent, Solvent } from '../db/models/index.ts';
import type { Preparation } from '../db/models/index.ts';
import { isGravimetricPlan } from './gravimetric-calc.ts';
import { lineageRow } from './lineage-view.ts';

export const STANDING_NOTE = SDS_NOTE;

/** The cautions of a material for a task, with the solvents involved (pure). */
export function hazardsFor(material: { ghsHazardStatements: string[]; ghsPictograms: string[] }, task: PrepTask = 'weigh_solid', solventNames: Array<string | null | undefined> = []): TaskHazards {
  return cautionsFor({ task, material, solventNames });
}

/** The task of a record: weighing the solid (stock), pipetting a solution (dilution, series level, mix) or weighing one (dilution by mass). */
export async function taskOf(p: Preparation): Promise<PrepTask> {
  const { kind } = await lineageRow(p.id);
  if (kind === 'stock') return 'weigh_solid';
  return isGravimetricPlan(p) ? 'weigh_solution' : 'pipette_solution';
}

/** The record's own solvent (latest make-up, else the one planned) and its parents' matrices. */
export async function solventNamesOf(p: Preparation, latestMakeUp?: MakeUp | null): Promise<string[]> {
  const own = latestMakeUp === undefined ? await MakeUp.findOne({ where: { preparationId: p.id }, order: [['id', 'DESC']] }) : latestMakeUp;
  const names: string[] = [];
  let ownName = own?.solventSnapshot?.name ?? null;
  const plannedId = (p.inputs as unknown as { solventId?: number } | null)?.solventId;
  if (!ownName && plannedId !== undefined) ownName = (await Solvent.findByPk(plannedId))?.name ?? null;
  const links = await PreparationParent.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] });
  for (const l of links) {
    const m = await MakeUp.findOne({ where: { preparationId: l.parentPreparationId }, order: [['id', 'DESC']] });
    if (m?.solventSnapshot?.name) names.push(m.solventSnapshot.name);
  }
  if (ownName) names.unshift(ownName);
  return names;
}

/** GET /api/preparations/:key hazards: the material's cautions for the record's task and its solvents. */
export async function preparationHazards(p: Preparation, latestMakeUp?: MakeUp | null): Promise<TaskHazards> {
  const [task, solvents] = await Promise.all([taskOf(p), solventNamesOf(p, latestMakeUp)]);
  return hazardsFor(p.snapshotMaterial, task, solvents);
}
