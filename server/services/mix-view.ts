/**
 * Mixes read side (REQUIREMENTS TR-04, TR-11; METROLOGY §5.5): a mix is one flask into which an aliquot of each of
 * 2–10 verified parent standards (distinct analytes) is pipetted and made up to volume. Each analyte i has its own
 * concentration and GUM budget from the volumetric dilution core:
 *     c_i = c_parent,i · V_aliquot,i / V_flask,  u_r(c_i)² = u_r(c_parent,i)² + u_r(V_aliquot,i)² + u_r(V_flask)²
 * (the flask is shared: its volume enters every component's budget; the components are correlated through it,
 * which matters only if someone combines two analytes' results — we never do).
 * Storage: one preparation (kind 'mix'), one preparation_parents row per component (role 'component'), one
 * append-only dilution_aliquots row per delivered aliquot (parent_link_id = the component), the ordinary make-up.
 * Results are stored at write time with the record (preparations.dilution_result, migration 0011) as
 * { kind: 'mix', components: [{ linkId, …result, basedOn: { aliquotId, makeUpId } }] } and returned as stored while
 * every basedOn still names the component's current aliquot and the current make-up; otherwise computed.
 * No import of preparations.service or signatures.service (no import cycle).
 */
import type { Transaction } from 'sequelize';
import type { DilutionResult } from '../../shared/calc/dilution.ts';
import type { VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type { Aliquot, MixComponent, MixSection } from '../../shared/schemas/lineage.ts';
import type { LabSettings } from '../../shared/schemas/settings.ts';
import { DilutionAliquot, MakeUp, Preparation, PreparationParent, User } from '../db/models/index.ts';
import { activeAliquot, dilutionOf } from './lineage-view.ts';

export const MIX_CALC_VERSION = 'mix-1 (METROLOGY §5.5 per component: c_i = c_parent,i·V_aliquot,i/V_flask, relative variances add, no per-item temperature term)';

/** What a mix's `plan` column holds. */
export interface MixPlanComponent {
  parentId: number;
  parentIdentifier: string;
  analyteFormula: string;
  pipette: WareDto;
  aliquotMl: string;
  planned: DilutionResult;
}
export interface MixPlan {
  kind: 'mix';
  mix: { finalMl: string; flask: WareDto; components: MixPlanComponent[] };
}

export type MixComponentResult = NonNullable<MixComponent['result']>;
export interface StoredMixResults {
  kind: 'mix';
  components: Array<MixComponentResult & { linkId: number; analyteFormula: string }>;
}

export const isMixKind = (k: string) => k === 'mix';

export const mixPlanOf = (p: Preparation): MixPlan['mix'] | null => ((p.plan as unknown as Partial<MixPlan>)?.kind === 'mix' ? (p.plan as unknown as MixPlan).mix : null);

interface LoadedComponent {
  link: PreparationParent;
  plan: MixPlanComponent;
  aliquots: DilutionAliquot[];
  active: DilutionAliquot | undefined;
  result: MixComponentResult | null;
}

/** Every component of a mix in link order, with its aliquots, current aliquot and result (stored or computed). */
export async function loadMix(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>, transaction?: Transaction): Promise<{ components: LoadedComponent[]; makeUp: MakeUp | null; aliquots: DilutionAliquot[] } | null> {
  const plan = mixPlanOf(p);
  if (!plan) return null;
  const t = transaction ? { transaction } : {};
  const [links, aliquots, makeUp] = await Promise.all([
    PreparationParent.findAll({ where: { preparationId: p.id, role: 'component' }, order: [['id', 'ASC']], ...t }),
    DilutionAliquot.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], ...t }),
    MakeUp.findOne({ where: { preparationId: p.id }, order: [['id', 'DESC']], ...t }),
  ]);
  const stored = (p.get('dilutionResult') as StoredMixResults | null | undefined) ?? null;
  const components: LoadedComponent[] = [];
  for (const link of links) {
    const planned = plan.components.find((c) => c.parentId === link.parentPreparationId);
    if (!planned) continue;
    const own = aliquots.filter((a) => a.parentLinkId === link.id);
    const active = activeAliquot(own);
    let result: MixComponentResult | null = null;
    if (active && makeUp) {
      const kept = stored?.kind === 'mix' ? stored.components.find((c) => c.linkId === link.id) : undefined;
      if (kept && kept.basedOn.aliquotId === active.id && kept.basedOn.makeUpId === makeUp.id) {
        const { linkId: _l, analyteFormula: _a, ...r } = kept;
        result = r;
      } else {
        result = { ...dilutionOf(link.snapshot, active.volumeMl, active.pipetteSnapshot, makeUp.flaskSnapshot, settings.roundingRule), calcVersion: MIX_CALC_VERSION, basedOn: { aliquotId: active.id, makeUpId: makeUp.id } };
      }
    }
    components.push({ link, plan: planned, aliquots: own, active, result });
  }
  return { components, makeUp, aliquots };
}

/** "Pb 10.00 ± 0.05 mg/L; Cd 1.000 ± 0.006 mg/L (k = 2)": every analyte, in component order (list, labels). */
export function mixDisplay(parts: Array<{ analyteFormula: string; display: string; k: string }>): string {
  const sameK = parts.every((x) => x.k === parts[0]?.k);
  const strip = (d: string) => d.replace(/\s*\(k = [^)]*\)\s*$/, '');
  const body = parts.map((x) => `${x.analyteFormula} ${sameK ? strip(x.display) : x.display}`).join('; ');
  return sameK && parts.length ? `${body} (k = ${parts[0]!.k})` : body;
}

/**
 * Inside the write transaction of a mix's aliquot or make-up: when every component has a current aliquot and the
 * flask is made up, keep each component's result with the record (dilution_result) and set concentrationDisplay.
 * Does not save; returns the audit changes.
 */
export async function storeMixResults(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>, transaction: Transaction): Promise<Array<{ field: string; oldValue: unknown; newValue: unknown }>> {
  const m = await loadMix(p, settings, transaction);
  if (!m || !m.components.length || m.components.some((c) => !c.result)) return [];
  const stored: StoredMixResults = { kind: 'mix', components: m.components.map((c) => ({ linkId: c.link.id, analyteFormula: c.plan.analyteFormula, ...c.result! })) };
  const display = mixDisplay(m.components.map((c) => ({ analyteFormula: c.plan.analyteFormula, display: c.result!.display, k: c.result!.k })));
  const before = p.concentrationDisplay;
  p.set('dilutionResult', stored as unknown as Record<string, unknown>);
  p.concentrationDisplay = display;
  const out: Array<{ field: string; oldValue: unknown; newValue: unknown }> = [
    { field: 'mixResults', oldValue: null, newValue: `${display} (${MIX_CALC_VERSION}; ${stored.components.map((c) => `${c.analyteFormula}: aliquot ${c.basedOn.aliquotId}`).join(', ')}; make-up ${m.makeUp!.id})` },
  ];
  if (before !== display) out.push({ field: 'concentration', oldValue: before, newValue: display });
  return out;
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

/** The `mix` part of the detail's lineage section (null for anything that is not a mix with a mix plan). */
export async function mixSection(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>): Promise<MixSection | null> {
  const plan = mixPlanOf(p);
  const m = await loadMix(p, settings);
  if (!plan || !m) return null;
  const users = new Map((await User.findAll({ where: { id: [...new Set(m.aliquots.map((a) => a.recordedBy))] } })).map((u) => [u.id, u]));
  const supersededBy = new Map<number, number>();
  for (const a of m.aliquots) if (a.supersedesId !== null) supersededBy.set(a.supersedesId, a.id);
  return {
    plannedFinalMl: plan.finalMl,
    components: m.components.map((c) => {
      const out: MixComponent = {
        linkId: c.link.id,
        parent: { id: c.link.parentPreparationId, identifier: c.link.snapshot.identifier, snapshot: c.link.snapshot },
        analyteFormula: c.plan.analyteFormula,
        plannedAliquot: { pipette: { id: c.plan.pipette.id, identifier: c.plan.pipette.identifier, snapshot: c.plan.pipette }, volumeMl: c.plan.aliquotMl },
        aliquots: c.aliquots.map((a) => aliquotDto(a, supersededBy, users)),
        planned: c.plan.planned,
      };
      if (c.result) out.result = c.result;
      return out;
    }),
  };
}

/** What the signature service needs of a mix: every aliquot, the current ones, the results (null until all exist). */
export interface MixEntries {
  aliquots: DilutionAliquot[];
  current: DilutionAliquot[];
  /** analytes whose component has no current aliquot yet */
  missing: string[];
  results: StoredMixResults['components'] | null;
}

export async function mixEntriesOf(p: Preparation, settings: Pick<LabSettings, 'roundingRule'>, transaction?: Transaction): Promise<MixEntries | null> {
  const m = await loadMix(p, settings, transaction);
  if (!m) return null;
  const complete = m.components.length > 0 && m.components.every((c) => c.result);
  return {
    aliquots: m.aliquots,
    current: m.components.map((c) => c.active).filter((a): a is DilutionAliquot => Boolean(a)),
    missing: m.components.filter((c) => !c.active).map((c) => `${c.plan.analyteFormula} from ${c.plan.parentIdentifier}`),
    results: complete ? m.components.map((c) => ({ linkId: c.link.id, analyteFormula: c.plan.analyteFormula, ...c.result! })) : null,
  };
}

/**
 * The mix-only part of the hashed canonical record (signatures.service): every aliquot record with the component
 * it belongs to (superseded ones too, oldest first) and every component's result (null until all exist).
 */
export function mixHashFields(e: MixEntries): Record<string, unknown> {
  return {
    aliquots: e.aliquots.map((a) => ({
      id: a.id,
      componentId: a.parentLinkId,
      pipetteId: a.pipetteId,
      pipetteIdentifier: a.pipetteIdentifier,
      pipetteSnapshot: a.pipetteSnapshot,
      volumeMl: a.volumeMl,
      supersedesId: a.supersedesId,
      correctionReason: a.correctionReason,
      recordedBy: a.recordedBy,
      recordedAt: a.recordedAt,
    })),
    mixResults: e.results,
  };
}

/** Why a mix is not complete for "prepared", or null. */
export function mixCompleteness(e: MixEntries, hasMakeUp: boolean): string | null {
  if (e.missing.length) return `record the aliquot of every component first (missing: ${e.missing.join(', ')})`;
  if (!hasMakeUp) return 'record the make-up first';
  if (!e.results) return 'the mix results have not been computed';
  return null;
}

/**
 * What a label prints for a mix (printing.service): every analyte with its recomputed concentration ± U once all
 * exist, else the planned ones marked as planned; `short` keeps each value as displayed with its unit.
 */
export function mixLabelText(d: { mix?: MixSection }): { display: string; short: string } | null {
  const mix = d.mix;
  if (!mix?.components.length) return null;
  const done = mix.components.every((c) => c.result);
  const parts = mix.components.map((c) => ({ analyteFormula: c.analyteFormula, r: (done ? c.result : c.planned)! }));
  const short = parts
    .map(({ analyteFormula, r }) => {
      const m = /^\s*([^\s±]+)\s*±/.exec(r.display);
      return `${analyteFormula} ${m ? m[1] : r.value} ${r.unit}`;
    })
    .join('; ');
  const display = mixDisplay(parts.map(({ analyteFormula, r }) => ({ analyteFormula, display: r.display, k: r.k })));
  return done ? { display, short } : { display: `${display} (planned; not yet made up)`, short: `${short} (planned)` };
}
