/**
 * Expected result of a volumetric dilution, shown live while the chemist picks the glassware
 * (METROLOGY.md §5.5): c2 = c1 · Vp / Vf, u_r(c2)² = u_r(c1)² + u_r(Vp)² + u_r(Vf)², glassware tolerances
 * as triangular distributions u = a/√6 for glass (METROLOGY.md §4.4, QUAM convention) and rectangular
 * a/√3 for piston pipettes (ISO 8655 maximum permissible error, the conservative choice). No temperature term: the
 * liquid's expansion cancels in the ratio Vp/Vf. The server recomputes the record; this is guidance only.
 * Decimal strings throughout (shared/calc/decimal.ts); rounding only for the display string.
 */
import { D, type Dec } from '../../../shared/calc/decimal.ts';
import { formatResult } from '../../../shared/calc/rounding.ts';

export type ExpectedDilutionInput = {
  parent: { value: string; unit: string; standardUncertainty: string };
  pipette: { nominalVolumeMl: string; toleranceMl?: string | null; kind?: string };
  flask: { nominalVolumeMl: string; toleranceMl?: string | null };
};

export type ExpectedDilution = {
  value: string;
  unit: string;
  standardUncertainty: string;
  expandedUncertainty: string;
  relative: string;
  dilutionFactor: string;
  display: string;
};

const SQRT6 = new D(6).sqrt();
const SQRT3 = new D(3).sqrt();

function dec(text: string | null | undefined): Dec | null {
  if (text === null || text === undefined || text.trim() === '') return null;
  try {
    const d = new D(text.trim());
    return d.isFinite() ? d : null;
  } catch {
    return null;
  }
}

/** null when an input is missing or not a positive number, or the pipette is larger than the flask. */
export function expectedDilution(input: ExpectedDilutionInput): ExpectedDilution | null {
  const c1 = dec(input.parent.value);
  const u1 = dec(input.parent.standardUncertainty);
  const vp = dec(input.pipette.nominalVolumeMl);
  const vf = dec(input.flask.nominalVolumeMl);
  if (!c1 || !u1 || !vp || !vf || c1.lte(0) || u1.lt(0) || vp.lte(0) || vf.lte(0) || vp.gte(vf)) return null;
  const ap = dec(input.pipette.toleranceMl) ?? new D(0);
  const af = dec(input.flask.toleranceMl) ?? new D(0);
  const c2 = c1.times(vp).div(vf);
  const ur1 = u1.div(c1);
  const urp = ap.div(input.pipette.kind === 'piston_pipette' ? SQRT3 : SQRT6).div(vp);
  const urf = af.div(SQRT6).div(vf);
  const ur = ur1.pow(2).plus(urp.pow(2)).plus(urf.pow(2)).sqrt();
  const u = c2.times(ur);
  const U = u.times(2);
  return {
    value: c2.toString(),
    unit: input.parent.unit,
    standardUncertainty: u.toString(),
    expandedUncertainty: U.toString(),
    relative: ur.toString(),
    dilutionFactor: vf.div(vp).toString(),
    display: U.gt(0) ? formatResult(c2, U, input.parent.unit, '2') : `${c2.toString()} ${input.parent.unit}`,
  };
}

/** The aliquot (mL) a target needs from a parent into a flask: Vp = c2 · Vf / c1. */
export function aliquotFor(target: string, parent: string, flaskMl: string): string | null {
  const c2 = dec(target);
  const c1 = dec(parent);
  const vf = dec(flaskMl);
  if (!c2 || !c1 || !vf || c2.lte(0) || c1.lte(0) || vf.lte(0)) return null;
  return c2.times(vf).div(c1).toString();
}
