/**
 * The pure rules of the "Make a mix" page (no React): which parents can go in, the live expected concentration
 * of every analyte, the checks shown at the fields before sending, and the body of POST /api/mixes.
 * The server checks all of it again (mix.service.ts); these are the same rules so the field shows the reason first:
 *   - only a verified, in-date standard with a concentration; not a mix (a dilution takes one analyte);
 *   - each analyte once; 2 to 10 components;
 *   - the aliquots together must fit the flask (there must be room for the solvent);
 *   - a bulb pipette delivers its nominal volume; a piston pipette is set between 10 % of nominal and nominal.
 * Expected result per analyte: the dilution page's own calculation (expected-dilution.ts, METROLOGY §5.5).
 */
import { D } from '../../../shared/calc/decimal.ts';
import { mixInputSchema, type MixInput } from '../../../shared/schemas/lineage.ts';
import type { VolumetricWare } from '../../../shared/schemas/inventory.ts';
import type { PreparationDetail } from '../preparations/types.ts';
import { expectedDilution, type ExpectedDilution } from '../lineage/expected-dilution.ts';
import { parentConcentration, type ParentConcentration } from '../lineage/parent-check.ts';
import type { LineageSection } from '../lineage/types.ts';

export const MIN_COMPONENTS = 2;
export const MAX_COMPONENTS = 10;

export { parentConcentration, type ParentConcentration } from '../lineage/parent-check.ts';

/** Why `d` cannot go into a mix today, or null. */
export function mixParentRefusal(d: PreparationDetail, today: string): string | null {
  const kind = (d as PreparationDetail & LineageSection).kind;
  if (d.status !== 'verified') return `${d.identifier} is ${d.status === 'planned' ? 'not yet signed' : `'${d.status}'`}: only a verified standard can go into a mix`;
  if (d.expiry.expiresOn < today) return `${d.identifier} expired on ${d.expiry.expiresOn}`;
  if (kind === 'mix') return `${d.identifier} is itself a mix: a mix cannot be used as a parent yet`;
  if (!parentConcentration(d)) return `${d.identifier} has no computed concentration`;
  return null;
}

export interface ComponentRow {
  parentKey: string;
  /** '' until chosen */
  pipetteId: string;
  /** piston pipettes only: the volume to set, mL ('' = nominal) */
  aliquotMl: string;
}

export type Pipette = Pick<VolumetricWare, 'id' | 'identifier' | 'kind' | 'nominalVolumeMl' | 'toleranceMl' | 'class'>;
export type Flask = Pick<VolumetricWare, 'id' | 'identifier' | 'nominalVolumeMl' | 'toleranceMl' | 'class'>;

/** The volume a component's pipette delivers as chosen: nominal for a bulb pipette, the set volume (or nominal) for a piston one. */
export function deliveredMl(pipette: Pipette | undefined, aliquotMl: string): string | null {
  if (!pipette) return null;
  if (pipette.kind !== 'piston_pipette' || aliquotMl.trim() === '') return pipette.nominalVolumeMl;
  try {
    const v = new D(aliquotMl.trim());
    return v.isFinite() && v.gt(0) ? v.toString() : null;
  } catch {
    return null;
  }
}

export interface ExpectedComponent {
  parentKey: string;
  analyteFormula: string;
  deliveredMl: string | null;
  expected: ExpectedDilution | null;
}

/** Each analyte's expected concentration ± U with the chosen ware (null until parent, pipette and flask are known). */
export function expectedMix(rows: ComponentRow[], parents: Map<string, PreparationDetail>, pipettes: Pipette[], flask: Flask | undefined): { components: ExpectedComponent[]; totalMl: string; fits: boolean | null } {
  let total = new D(0);
  const components = rows.map((r) => {
    const p = parents.get(r.parentKey);
    const pipette = pipettes.find((w) => String(w.id) === r.pipetteId);
    const ml = deliveredMl(pipette, r.aliquotMl);
    if (ml) total = total.plus(ml);
    const conc = p ? parentConcentration(p) : null;
    const expected = conc && pipette && ml && flask ? expectedDilution({ parent: conc, pipette: { ...pipette, nominalVolumeMl: ml }, flask }) : null;
    return { parentKey: r.parentKey, analyteFormula: p?.analyteFormula ?? '', deliveredMl: ml, expected };
  });
  return { components, totalMl: total.toString(), fits: flask ? total.lt(flask.nominalVolumeMl) : null };
}

/** Messages at the fields, keyed like the API's (components.N.pipetteId, flaskId, components). */
export function mixFieldErrors(rows: ComponentRow[], parents: Map<string, PreparationDetail>, pipettes: Pipette[], flask: Flask | undefined, today: string): Record<string, string> {
  const errs: Record<string, string> = {};
  if (rows.length < MIN_COMPONENTS) errs.components = 'A mix needs at least two components: add another verified standard';
  if (rows.length > MAX_COMPONENTS) errs.components = `Use at most ${MAX_COMPONENTS} components`;
  const seen = new Map<string, number>();
  rows.forEach((r, i) => {
    const p = parents.get(r.parentKey);
    if (p) {
      const why = mixParentRefusal(p, today);
      if (why) errs[`components.${i}.parentKey`] = why;
      const j = seen.get(p.analyteFormula);
      if (j !== undefined && !why) errs[`components.${i}.parentKey`] = `${p.identifier} is ${p.analyteFormula}, like component ${j + 1}: each analyte can be in a mix once`;
      else seen.set(p.analyteFormula, i);
    }
    const pipette = pipettes.find((w) => String(w.id) === r.pipetteId);
    if (!pipette) errs[`components.${i}.pipetteId`] = 'Choose a pipette';
    else if (pipette.kind === 'piston_pipette' && r.aliquotMl.trim() !== '') {
      const ml = deliveredMl(pipette, r.aliquotMl);
      const n = new D(pipette.nominalVolumeMl);
      if (!ml) errs[`components.${i}.aliquotMl`] = 'Enter the volume as a number, e.g. 0.500';
      else if (new D(ml).gt(n) || new D(ml).lt(n.mul('0.1'))) errs[`components.${i}.aliquotMl`] = `Set ${pipette.identifier} between ${n.mul('0.1').toString()} and ${n.toString()} mL (10 % of nominal to nominal)`;
    }
  });
  if (!flask) errs.flaskId = 'Choose a volumetric flask';
  else {
    const { totalMl, fits } = expectedMix(rows, parents, pipettes, flask);
    if (fits === false) errs.flaskId = `The aliquots add up to ${totalMl} mL, which does not fit the ${flask.nominalVolumeMl} mL flask: choose a larger flask or smaller aliquots`;
  }
  return errs;
}

/** The body of POST /api/mixes, checked against the shared schema. */
export function toMixInput(rows: ComponentRow[], pipettes: Pipette[], flaskId: number, notes?: string): MixInput {
  return mixInputSchema.parse({
    components: rows.map((r) => {
      const pipette = pipettes.find((w) => String(w.id) === r.pipetteId);
      return { parentKey: r.parentKey, pipetteId: Number(r.pipetteId), ...(pipette?.kind === 'piston_pipette' && r.aliquotMl.trim() !== '' ? { aliquotMl: r.aliquotMl.trim() } : {}) };
    }),
    flaskId,
    ...(notes && notes.trim() ? { notes: notes.trim() } : {}),
  });
}
