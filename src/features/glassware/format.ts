/**
 * Pure helpers of the glassware-check pages: words for statuses and verdicts, the replicate grid of the bench,
 * the request of the bench's live calculation, and how results are rounded for display (at the edge only;
 * the stored and computed values stay full-precision decimal strings).
 */
import { D } from '../../../shared/calc/decimal.ts';
import { limitSourceText } from '../../../shared/calc/volume-tolerances.ts';
import { volumeCheckReadingInputSchema, type VolumeCheckRequestInput } from '../../../shared/schemas/volume-check.ts';
import type { Balance } from '../../../shared/schemas/inventory.ts';
import { decimalsOf, fixed, sig } from '../calculate/format-result.ts';
import type { CheckReading, VolumeCheckDetail, VolumeCheckResponse, WareCalibration } from './types.ts';

/** Kinds a gravimetric check covers (ISO 4787: flasks, bulb pipettes, burettes; ISO 8655-6: piston pipettes). */
export const CHECKABLE_KINDS: readonly string[] = ['bulb_pipette', 'volumetric_flask', 'piston_pipette', 'burette'];
export const isCheckable = (kind: string) => CHECKABLE_KINDS.includes(kind);

export const CHECK_KIND_LABELS: Record<string, string> = {
  bulb_pipette: 'Bulb pipette',
  volumetric_flask: 'Volumetric flask',
  piston_pipette: 'Piston pipette',
  burette: 'Burette',
  graduated_pipette: 'Graduated pipette',
};

export const MATERIAL_LABELS: Record<string, string> = {
  borosilicate_3_3: 'Borosilicate glass 3.3',
  soda_lime: 'Soda-lime glass',
  polypropylene: 'Polypropylene',
};

export const METHOD_TEXT: Record<string, string> = {
  piston_pipette: 'ISO 8655-6: 10 replicates at each tested volume (nominal, 50 % and 10 %)',
  glass: 'ISO 4787: replicates at the nominal volume, as many as the lab chooses (10 is common practice)',
};

export function methodText(kind: string): string {
  return kind === 'piston_pipette' ? METHOD_TEXT.piston_pipette! : METHOD_TEXT.glass!;
}

/** The ware's calibration status in words, with the tone of the app's banners. */
export const CALIBRATION_TEXT: Record<WareCalibration['status'], { label: string; hint: string; tone: 'ok' | 'bad' | 'caution' | 'neutral' }> = {
  calibrated: { label: 'Calibrated', hint: 'the latest verified check passed and is not yet due again', tone: 'ok' },
  failed: { label: 'Failed', hint: 'the latest verified check failed: do not use it for standards until a new check passes', tone: 'bad' },
  overdue: { label: 'Overdue', hint: 'the latest verified check passed but its next check is past due', tone: 'caution' },
  not_checked: { label: 'Not checked', hint: 'no verified gravimetric check yet', tone: 'neutral' },
};

/**
 * The status a check is shown with: the stored status, except a check sent back by the verifier (stored as
 * planned at a new version, with a "returned" signature as its latest) is shown as returned.
 */
export function displayStatus(d: Pick<VolumeCheckDetail, 'status' | 'signatures'>): 'planned' | 'prepared' | 'verified' | 'returned' {
  const last = d.signatures[d.signatures.length - 1];
  if (d.status === 'planned' && last?.meaning === 'returned') return 'returned';
  return d.status;
}

export function verdictText(verdict: 'pass' | 'fail' | null | undefined): string {
  return verdict === 'pass' ? 'Passed' : verdict === 'fail' ? 'Failed' : 'No result yet';
}

/** The limit's source as shown: no internal document references, "from memory" said once (shared helper). */
export function limitSource(limit: VolumeCheckResponse['verdict']['limit']): string {
  return limitSourceText(limit.source, limit.fromMemory);
}

/** Decimal places of a mass in grams read on a balance of this readability (mg): 0.1 mg → 4. */
export function gramDecimals(readabilityMg: string | null | undefined): number {
  if (!readabilityMg) return 4;
  try {
    return decimalsOf(new D(readabilityMg).div(1000).toFixed());
  } catch {
    return 4;
  }
}

/** A volume for display, to the places the balance resolves (1 mg of water ≈ 1 µL). */
export function volumeText(value: string | null | undefined, readabilityMg: string | null | undefined): string {
  return fixed(value, gramDecimals(readabilityMg));
}

/** A percentage for display: 3 significant figures (e.g. 0.0412 %). */
export function percentText(value: string | null | undefined): string {
  return sig(value, 3);
}

/** An expanded uncertainty: two significant figures (JCGM 100 §7.2.6 allows at most two). */
export function uncertaintyText(value: string | null | undefined): string {
  return sig(value, 2);
}

// ------------------------------------------------------------------ bench

export type ReplicateSlot = { replicate: number; current: CheckReading | null; history: CheckReading[] };

/** Replicates 1…n of one tested volume with the reading in force and every reading it superseded (oldest first). */
export function replicateSlots(d: Pick<VolumeCheckDetail, 'plan' | 'readings'>, testedIndex: number): ReplicateSlot[] {
  const n = d.plan.tested[testedIndex]?.replicates ?? 0;
  const mine = d.readings.filter((r) => r.testedIndex === testedIndex);
  return Array.from({ length: n }, (_, i) => {
    const rows = mine.filter((r) => r.replicate === i + 1);
    return { replicate: i + 1, current: rows.find((r) => r.current) ?? null, history: rows.filter((r) => !r.current) };
  });
}

/** The first replicate still without a reading, or null when the tested volume is complete. */
export function nextReplicate(slots: ReplicateSlot[]): number | null {
  return slots.find((s) => !s.current)?.replicate ?? null;
}

/** Counts per tested volume: recorded of planned. */
export function progress(d: Pick<VolumeCheckDetail, 'plan' | 'readings'>): { done: number; total: number } {
  const total = d.plan.tested.reduce((a, t) => a + t.replicates, 0);
  const done = d.readings.filter((r) => r.current).length;
  return { done, total };
}

const readingValue = volumeCheckReadingInputSchema.shape.value;

/** The message for a typed reading (the shared schema's rule), or null when it can be sent. Digits are kept as typed. */
export function readingError(text: string): string | null {
  if (text.trim() === '') return 'Enter the reading as the balance shows it';
  if (/,/.test(text)) return 'Use a point for decimals, as the balance shows it (e.g. 9.9742)';
  const r = readingValue.safeParse(text);
  return r.success ? null : (r.error.issues[0]?.message ?? 'Enter the reading as a number');
}

/** Grams for ≥ 1 mL, else milligrams (what a balance for that volume is usually set to show; common practice). */
export function defaultReadingUnit(testedValueMl: string): 'g' | 'mg' {
  try {
    return new D(testedValueMl).gte(1) ? 'g' : 'mg';
  } catch {
    return 'g';
  }
}

/**
 * The request of POST /api/calc/volume-check for one tested volume, built as the server builds the stored result
 * (volume-check.service.ts calcFor): the plan's ware and limits, the conditions, the balance's weight density,
 * readability and calibration uncertainty (u = U/k). `pending` is a reading typed but not yet recorded.
 * The endpoint needs two readings (for s); with one, that reading is sent twice and only its own volume is shown.
 */
export function liveRequest(
  d: Pick<VolumeCheckDetail, 'plan' | 'conditions' | 'readings' | 'balance'>,
  testedIndex: number,
  balance: Pick<Balance, 'weightDensityGPerMl' | 'calibrationUncertaintyMg' | 'calibrationUncertaintyK'> | null | undefined,
  pending?: { value: string; unit: string } | null,
): { request: VolumeCheckRequestInput; single: boolean } | null {
  const t = d.plan.tested[testedIndex];
  if (!t) return null;
  const readings = replicateSlots(d, testedIndex)
    .filter((s) => s.current)
    .map((s) => ({ value: s.current!.value, unit: s.current!.unit }));
  if (pending && readingError(pending.value) === null) readings.push({ value: pending.value.trim(), unit: pending.unit });
  if (readings.length === 0) return null;
  const single = readings.length === 1;
  let standardUncertainty: { value: string; unit: string } | undefined;
  if (balance?.calibrationUncertaintyMg && balance.calibrationUncertaintyK) {
    try {
      standardUncertainty = { value: new D(balance.calibrationUncertaintyMg).div(balance.calibrationUncertaintyK).toFixed(), unit: 'mg' };
    } catch {
      standardUncertainty = undefined;
    }
  }
  const { plan, conditions } = d;
  const request: VolumeCheckRequestInput = {
    ware: {
      kind: plan.kind,
      nominal: plan.nominal,
      class: plan.class,
      material: plan.material,
      mode: plan.mode,
      ...(plan.kind === 'piston_pipette' ? { testedVolume: { value: t.value, unit: t.unit } } : {}),
      ...(plan.limits ? { limits: plan.limits } : {}),
    },
    readings: single ? [readings[0]!, readings[0]!] : readings,
    waterTemperatureC: conditions.waterTemperatureC,
    waterAirSaturated: conditions.waterAirSaturated,
    air: conditions.air,
    balance: {
      weightDensity: { value: balance?.weightDensityGPerMl ?? '8.0', unit: 'g/mL' },
      readability: { value: d.balance.readabilityMg, unit: 'mg' },
      ...(standardUncertainty ? { standardUncertainty } : {}),
    },
    ...(conditions.evaporation ? { evaporation: conditions.evaporation } : {}),
  };
  return { request, single };
}

/** The tested volume's heading: "Nominal 10 mL" / "50 % — 0.1 mL". */
export function testedLabel(d: Pick<VolumeCheckDetail, 'plan'>, testedIndex: number): string {
  const t = d.plan.tested[testedIndex];
  if (!t) return '';
  if (d.plan.tested.length === 1) return `${t.value} ${t.unit} (nominal)`;
  const names = ['nominal', '50 %', '10 %'];
  return `${t.value} ${t.unit} (${names[testedIndex] ?? `setting ${testedIndex + 1}`})`;
}

/** A value rounded to the last place of its expanded uncertainty as shown (two significant figures; JCGM 100 §7.2.6). */
export function valueAtUncertainty(value: string | null | undefined, expanded: string | null | undefined): string {
  const u = uncertaintyText(expanded);
  if (u === '—' || /×/.test(u)) return fixed(value, 6);
  return fixed(value, decimalsOf(u));
}
