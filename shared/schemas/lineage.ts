import type { MatrixWarning } from '../prep/matrix.ts';
import type { TaskHazards } from '../prep/cautions.ts';
/**
 * Standards made from standards: dilutions of a verified parent, calibration series, and the lineage section
 * of a preparation's detail (REQUIREMENTS TR-04, TR-11, EX-01; METROLOGY §5.5).
 * Decimal strings throughout; volumes in mL.
 */
import { z } from 'zod';
import { PLAUSIBLE, checkConcentration, inRange } from './plausible.ts';
import { lineText, multilineText } from './text.ts';
import Decimal from 'decimal.js';
import { DECIMAL_TEXT } from './decimal-text.ts';
import { CONCENTRATION_UNITS, isConcentrationUnit } from '../calc/units.ts';
import type { DilutionResult, IntermediateProposal, SeriesLevelProposal } from '../calc/dilution.ts';
import type { VolumetricWare } from './inventory.ts';
import type { PreparationDetail } from './preparations.ts';
import type { GravimetricDilutionSection } from './gravimetric.ts';

export type { DilutionResult, IntermediateProposal, SeriesLevelProposal };

export const PREPARATION_KINDS = ['stock', 'dilution', 'series_level', 'mix'] as const;
export type PreparationKind = (typeof PREPARATION_KINDS)[number];

const positiveDecimal = (what: string) =>
  z
    .string({ error: `Enter ${what} as a number, e.g. 10.0` })
    .trim()
    .min(1, `Enter ${what}`)
    .regex(DECIMAL_TEXT, { error: `Enter ${what} as a decimal number such as 10.0 (use a point, not a comma)`, abort: true })
    .refine((s) => !DECIMAL_TEXT.test(s) || new Decimal(s).gt(0), `${what.charAt(0).toUpperCase() + what.slice(1)} must be greater than 0`);

const id = (what: string) => z.number({ error: `Choose ${what}` }).int(`Choose ${what}`).positive(`Choose ${what}`);
const reason = (what: string) => multilineText({ error: `Give ${what}` }).trim().min(3, `Give ${what} (at least 3 characters)`).max(500, 'Use at most 500 characters');

export const concentrationSchema = z
  .object({
    value: positiveDecimal('the target concentration'),
    unit: z
      .string({ error: 'Choose a unit for the target concentration' })
      .trim()
      .refine(isConcentrationUnit, `Use one of ${CONCENTRATION_UNITS.join(', ')} for the target concentration`),
  })
  .superRefine((t, ctx) => checkConcentration(t, ctx));
/** An aliquot volume in mL within its plausible range (shared/schemas/plausible.ts). */
const aliquot = (what: string) => positiveDecimal(what).superRefine(inRange(PLAUSIBLE.aliquot, what));

/** Body of POST /api/preparations/:key/dilutions (key = the parent). */
export const dilutionInputSchema = z.object({
  method: z.literal('volumetric', { error: 'Only volumetric dilutions can be planned so far' }),
  target: concentrationSchema,
  pipetteId: id('a pipette'),
  flaskId: id('a volumetric flask'),
  /** piston pipettes: the volume to set, mL (default: the nominal volume); bulb pipettes deliver their nominal */
  aliquotMl: aliquot('the aliquot volume').optional(),
  solventId: id('the solvent').optional(),
  notes: multilineText().trim().max(2000, 'Use at most 2000 characters').optional(),
});
export type DilutionInput = z.output<typeof dilutionInputSchema>;

const parentKey = lineText({ error: 'Give the parent preparation (identifier or id)' }).trim().min(1, 'Give the parent preparation (identifier or id)').max(40, 'Use at most 40 characters');

/** Body of POST /api/series/proposal. */
export const seriesProposalInputSchema = z.object({
  parentKey,
  levels: z.array(concentrationSchema, { error: 'Give the levels' }).min(1, 'Give at least one level').max(12, 'Use at most 12 levels'),
  minAliquotMl: aliquot('the minimum aliquot').optional(),
});
export type SeriesProposalInput = z.output<typeof seriesProposalInputSchema>;

/** Body of POST /api/series: each level becomes its own planned preparation (kind series_level). */
export const createSeriesInputSchema = z.object({
  parentKey,
  levels: z
    .array(
      z.object({ target: concentrationSchema, pipetteId: id('a pipette'), flaskId: id('a volumetric flask'), aliquotMl: aliquot('the aliquot volume').optional() }),
      { error: 'Give the levels' },
    )
    .min(1, 'Give at least one level')
    .max(12, 'Use at most 12 levels'),
  notes: multilineText().trim().max(2000, 'Use at most 2000 characters').optional(),
});
export type CreateSeriesInput = z.output<typeof createSeriesInputSchema>;

/** Body of POST /api/preparations/:key/aliquots: the aliquot actually delivered (pipette confirmed by scan). */
export const aliquotInputSchema = z.object({
  pipetteIdentifier: lineText({ error: 'Scan or type the pipette identifier' }).trim().min(1, 'Scan or type the pipette identifier').max(100, 'Use at most 100 characters'),
  /** piston pipettes: the volume set, as typed; bulb pipettes: omit (the nominal volume is delivered) */
  volumeMl: aliquot('the delivered volume').optional(),
  supersedesId: id('the aliquot to correct').optional(),
  correctionReason: reason('the reason for the correction').optional(),
  /** a mix only: which component (the preparation_parents id, MixComponent.linkId) this aliquot is for */
  componentId: id('the component').optional(),
});
export type AliquotInput = z.output<typeof aliquotInputSchema>;

/** Body of POST /api/mixes: 2 to 10 verified parents (distinct analytes), each pipetted into one flask. */
export const mixInputSchema = z.object({
  components: z
    .array(z.object({ parentKey, pipetteId: id('a pipette'), aliquotMl: aliquot('the aliquot volume').optional() }), { error: 'Give the components' })
    .min(2, 'A mix needs at least two components')
    .max(10, 'Use at most 10 components'),
  flaskId: id('a volumetric flask'),
  solventId: id('the solvent').optional(),
  notes: multilineText().trim().max(2000, 'Use at most 2000 characters').optional(),
});
export type MixInput = z.output<typeof mixInputSchema>;

// ---------------------------------------------------------------- DTOs

/** A parent as it was when it was used (frozen). */
export interface ParentSnapshot {
  id: number;
  identifier: string;
  kind: PreparationKind;
  status: string;
  version: number;
  analyteFormula: string;
  concentration: { value: string; unit: string; standardUncertainty: string; display: string };
  expiresOn: string;
}

export interface Aliquot {
  id: number;
  pipette: { id: number; identifier: string; snapshot: VolumetricWare };
  volumeMl: string;
  supersedesId?: number;
  supersededById?: number;
  correctionReason?: string;
  recordedBy: { id: number; fullName: string };
  recordedAt: string;
}

/** How a dilution is made: by volume (pipette and flask, DilutionSection) or by mass (GravimetricDilutionSection). */
export type DilutionMethod = 'volumetric' | 'gravimetric';

export interface DilutionSection {
  method: 'volumetric';
  parent: { id: number; identifier: string; snapshot: ParentSnapshot };
  plannedAliquot: { pipette: { id: number; identifier: string; snapshot: VolumetricWare }; volumeMl: string };
  plannedFinalMl: string;
  /** the expected concentration and budget with the planned ware (parent as an input, tolerances triangular) */
  planned: DilutionResult;
  aliquots: Aliquot[];
  /** recomputed from the stored aliquot and make-up; absent until both are recorded */
  result?: DilutionResult & { calcVersion: string; basedOn: { aliquotId: number; makeUpId: number } };
  series?: { id: number; identifier: string };
  /** set when the dilution's solvent (made up, else planned) differs from the parent's (shared/prep/matrix.ts) */
  matrixWarning?: MatrixWarning;
}

/** One analyte of a mix: its parent, its planned aliquot, the aliquots delivered and its own concentration and budget. */
export interface MixComponent {
  /** the preparation_parents id: send it as componentId when recording this component's aliquot */
  linkId: number;
  parent: { id: number; identifier: string; snapshot: ParentSnapshot };
  analyteFormula: string;
  plannedAliquot: { pipette: { id: number; identifier: string; snapshot: VolumetricWare }; volumeMl: string };
  aliquots: Aliquot[];
  /** c_i = c_parent,i·V_aliquot,i/V_flask with the planned ware (METROLOGY §5.5) */
  planned: DilutionResult;
  /** recomputed from this component's current aliquot and the make-up; absent until both are recorded */
  result?: DilutionResult & { calcVersion: string; basedOn: { aliquotId: number; makeUpId: number } };
}

export interface MixSection {
  plannedFinalMl: string;
  components: MixComponent[];
}

/** What the detail of any preparation carries about its lineage (stocks: kind only, plus children). */
export interface LineageSection {
  kind: PreparationKind;
  dilution?: DilutionSection;
  /** a gravimetric dilution (DilutionSection is the volumetric one; the method tells them apart) */
  gravimetric?: GravimetricDilutionSection;
  mix?: MixSection;
  /** preparations made from this one (forward trace, TR-04) */
  children: Array<{ id: number; identifier: string; kind: PreparationKind; status: string }>;
}

export type PreparationDetailWithLineage = PreparationDetail & LineageSection;

export interface SeriesDto {
  id: number;
  identifier: string;
  parent: { id: number; identifier: string };
  analyteFormula: string;
  unit: string;
  createdBy: { id: number; fullName: string };
  createdAt: string;
  levels: Array<{ id: number; identifier: string; status: string; target: { value: string; unit: string }; pipetteIdentifier: string; flaskIdentifier: string; plannedConcentration: string; expiresOn: string }>;
}

// ---------------------------------------------------------------- one series, the list (GET /api/series, /api/series/:key)

/** A concentration with its uncertainty as the API gives it (decimal strings; `display` GUM-rounded). */
export interface SeriesConcentration {
  value: string;
  unit: string;
  standardUncertainty: string;
  expandedUncertainty: string;
  k: string;
  display: string;
}

/** A signature on a level, for the series page and sheet (the valid one, newest). */
export interface SeriesSigner {
  id: number;
  fullName: string;
  signedAt: string;
}

/** One level as the bench chemist and QA read it: the stored plan, the recomputed result, state and signatures. */
export type SeriesLevelDetail = SeriesDto['levels'][number] & {
  /** 1, 2, … in the order the levels were created */
  levelNo: number;
  version: number;
  /** planned | weighed (aliquot recorded) | made_up | complete */
  stage: string;
  /** the planned aliquot (plan.dilution) */
  aliquot: { pipette: { id: number; identifier: string; kind: string; nominalVolumeMl: string }; volumeMl: string };
  flask: { id: number | null; identifier: string; nominalVolumeMl: string };
  /** expected with the planned ware, from the stored plan (plan.dilution.planned) */
  planned: SeriesConcentration;
  /** recomputed from the recorded aliquot and make-up; absent until both are recorded */
  result?: SeriesConcentration & { basedOn: { aliquotId: number; makeUpId: number } };
  /** the aliquot that counts, once recorded */
  aliquotRecorded?: { pipetteIdentifier: string; volumeMl: string };
  expiryReason: string;
  preparedBy?: SeriesSigner;
  verifiedBy?: SeriesSigner;
};

/** GET /api/series/:key: the series with its parent (as used) and every level in full. */
export interface SeriesDetail extends Omit<SeriesDto, 'parent' | 'levels'> {
  parent: SeriesDto['parent'] & {
    /** the parent as used when the series was made (frozen snapshot) */
    version: number;
    concentrationDisplay: string;
    expiresOn: string;
    /** the parent record's status now */
    status: string;
    material: { name: string; lot: string; producer: string; certificateNumber: string | null; expiresOn: string | null };
  };
  levels: SeriesLevelDetail[];
  /** cautions for pipetting the parent's solution, its matrix and the levels' solvents (shared/prep/cautions.ts) */
  hazards: TaskHazards;
  notes?: string;
}

/** Query of GET /api/series: newest first, optionally the series of one parent (identifier or id). */
export const seriesListQuerySchema = z.object({
  parent: z
    .string()
    .trim()
    .max(40, 'Use at most 40 characters')
    .regex(/^([1-9]\d{0,15}|[A-Z]{2,6}-\d{4}-\d{4,})$/, 'Give the parent as an identifier such as HWL-2026-0001 (or its id)')
    .optional(),
  page: z.coerce.number({ error: 'page is a whole number ≥ 1' }).int('page is a whole number ≥ 1').min(1, 'page is a whole number ≥ 1').default(1),
  pageSize: z.coerce.number({ error: 'pageSize is 1 to 100' }).int('pageSize is 1 to 100').min(1, 'pageSize is 1 to 100').max(100, 'pageSize is 1 to 100').default(25),
});
export type SeriesListQuery = z.output<typeof seriesListQuerySchema>;

export interface SeriesSummary extends Omit<SeriesDto, 'levels'> {
  levels: Array<{ id: number; identifier: string; status: string; target: { value: string; unit: string }; expiresOn: string }>;
}

export interface SeriesList {
  items: SeriesSummary[];
  total: number;
  page: number;
  pageSize: number;
}

export interface SeriesProposalResponse {
  parent: ParentSnapshot;
  minAliquotMl: string;
  levels: SeriesLevelProposal[];
  /** when levels lie too far below the parent: a first dilution to plan (POST /api/preparations/:parent/dilutions) that those levels then come from */
  intermediate?: IntermediateProposal;
}

export interface CreateSeriesResponse {
  series: SeriesDto;
  preparations: PreparationDetailWithLineage[];
}
