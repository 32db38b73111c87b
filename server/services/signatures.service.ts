/**
 * Electronic signatures and second-person verification (REQUIREMENTS ES-01…ES-08, RV-01…RV-03, RV-06, CO-01, CO-02).
 *
 * - A signature needs the signed-in identity and the password re-entered at each signing (ES-04); a wrong
 *   password is 401 signature_password, counted towards the account lockout (PW-03) and audited
 *   ("signature_failed"). Success is audited ("sign", with the meaning and the record version).
 * - Each signature stores the record version and the SHA-256 of the canonical JSON of that version (ES-03).
 *   The canonical JSON is stored once per signed version in record_versions. Validity is computed: a
 *   signature is valid while the record's version and hash are still the ones it signed.
 * - "verified" and "returned" need a chemist who did not plan, enter or change any data in the current
 *   version and did not sign it "prepared" (RV-02); a refusal is 403 self_verification and audited.
 * - A change to a signed record (checkChange / recordAmendment, called by preparations.service) needs a reason
 *   and the changer's password; it records an "amended" signature, and the status goes back to planned.
 * - E-mails (verification requested, returned, verified) are queued in the same transaction and sent after commit.
 *
 * RECORD HASH. recordHash = SHA-256 (hex) of canonicalJson (server/db/transaction.ts: keys sorted, no
 * whitespace, decimal strings as strings) of exactly:
 *   { preparationId, identifier, version, inputs, notes, conditionsUsed,
 *     snapshot: { material, balance, flask }, plan (as stored, with the core's response), gates,
 *     weighings: every weighing (superseded ones too), oldest first, each { id, mode, reading, before, after,
 *       unit, netMg, balanceId, balanceSnapshot, conditions, airDensity, inWindow, outOfWindowReason,
 *       supersedesId, correctionReason, recordedBy, recordedAt },
 *     makeUps: every make-up, oldest first, each { id, flaskId, flaskIdentifier, flaskSnapshot, substituted,
 *       solventId, solventLot, solventSnapshot, solutionTemperatureC, applyTemperatureCorrection,
 *       correctionReason, supersedesId, recordedBy, recordedAt },
 *     result, expiresOn, expiryReason }
 * (expiresOn and expiryReason as signed: after a QA expiry extension, the pre-extension values until the next
 * version; server/db/models/expiry-extension.ts expiryAsSigned)
 * and, for a dilution or series level only (stocks hash exactly the fields above, so their hashes are unchanged):
 *     aliquots: every aliquot record (superseded ones too), oldest first, each { id, pipetteId, pipetteIdentifier,
 *       pipetteSnapshot, volumeMl, supersedesId, correctionReason, recordedBy, recordedAt },
 *     dilutionResult: the dilution result recomputed from the current aliquot and make-up (lineage-view), or null
 * and, for a mix only (mix-view.ts mixHashFields): aliquots as above plus componentId (the preparation_parents id),
 *     mixResults: every component's result ({ linkId, analyteFormula, …result, basedOn }), or null until all exist;
 *     a mix is complete for "prepared" with a current aliquot for every component, a make-up and the results.
 * A dilution is complete for "prepared" with a current aliquot, a make-up and a dilution result (no weighing).
 * A gravimetric dilution hashes, instead of aliquots, gravimetricReadings (every readings record) and its stored
 * dilutionResult (gravimetricHashFields); it is complete for "prepared" with current readings and a result.
 * Status, status history and the signatures themselves are not part of it (signing does not change the record).
 *
 * CANONICAL VERSION 2 (every signature written from now on): the fields above plus canonicalVersion: 2 and
 * `shown`, the preparation columns a screen, PDF, label or export shows that are not already among them
 * (shownColumns below): analyte_formula, target_value, target_unit, volume_value, volume_unit, material_id,
 * balance_id, flask_id, kind, created_on, created_by, created_at, concentration_display and dilution_result.
 * With the fields above, every stored column that is read out is signed; the only preparation columns left out
 * are status (checked against the signatures instead: record-integrity.ts), updated_at (bookkeeping, shown
 * nowhere), and pre_extension_* with the current expires_on/expiry_reason after a QA extension (checked
 * against the append-only expiry_extensions row). A version-1 signature (written before) keeps checking against
 * the version-1 record (recordForHash(…, 1)); for those the shown columns are checked by deriving them from the
 * signed data where they can be (record-integrity.ts sealProblems).
 *
 * CANONICAL VERSION 3 (every signature written from now on; issue 15): version 2 with canonicalVersion: 3 and,
 * on every weighing and every gravimetric readings record, `captures`: how each reading came in (method, the raw
 * balance print, stability, the identity the balance printed, time, flags; '{}' on rows written before capture was
 * recorded). A version-2 signature keeps checking against the version-2 record (recordForHash(…, 2)), so the hashes
 * of records signed before do not change.
 */
import { createHash } from 'node:crypto';
import type { Transaction } from 'sequelize';
import { parsePreparationId } from '../../shared/prep/index.ts';
import { outOfPlan, type PlanValue } from '../../shared/prep/plan-plausibility.ts';
import {
  OUT_OF_PLAN_CHECK_KEY,
  SIGNATURE_MEANING_TEXT,
  SIGNATURE_RESPONSIBILITY_STATEMENT,
  VERIFICATION_CHECKLIST,
  type CanSign,
  type ChangeSignatureInput,
  type ChecklistItem,
  type ResultOutOfPlan,
  type PreparationDetail,
  type Signature as SignatureDto,
  type SignatureInput,
  type SignatureMeaning,
} from '../../shared/schemas/preparations.ts';
import type { Role } from '../../shared/schemas/roles.ts';
import {
  DilutionAliquot,
  GravimetricReading,
  expiryAsSigned,
  MakeUp,
  Preparation,
  PreparationEvent,
  RecordVersion,
  ReviewFlag,
  Signature,
  SignatureAcknowledgement,
  User,
  Weighing,
} from '../db/models/index.ts';
import { canonicalJson, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { enqueueMail, type Mailer, type QueuedMail } from '../mail/mailer.ts';
import { returnedMail, verificationRequestedMail, verifiedMail, type RecordRef } from '../mail/templates.ts';
import { recordAudit } from './audit.service.ts';
import { nextStatus, invalidTransition, transition, dataEntryMode, type StatusEvent } from './preparation-status.ts';
import { verifyPassword } from './passwords.ts';
import { endUserSessions } from './sessions.service.ts';
import { PASSWORD_CHANGE_REQUIRED } from '../../shared/schemas/auth.ts';
import { activeAliquot, dilutionResultOf, isDilutionKind, lineageRow } from './lineage-view.ts';
import { mixCompleteness, mixEntriesOf, mixHashFields, mixPlanOf, type MixEntries } from './mix-view.ts';
import { getSettings } from './settings.service.ts';
import { fullSealCheck, SEAL_BROKEN, type SealBroken } from './record-integrity.ts';
import { activeReadings, gravimetricResultOf, isGravimetricPlan, readingsOf } from './gravimetric-calc.ts';

export interface Signer {
  id: number;
  fullName: string;
}

export interface SignOptions {
  lockoutThreshold: number;
  /** base of the links in e-mails */
  publicUrl: string;
  mailer?: Mailer;
  /** for the demo seed (fixed dates); routes use the server clock */
  now?: Date;
}

const EVENT_OF: Record<SignatureInput['meaning'], StatusEvent> = {
  prepared: 'sign_prepared',
  verified: 'sign_verified',
  returned: 'sign_returned',
  discarded: 'sign_discarded',
};

/** Who may sign each meaning (REQUIREMENTS RV-07: admin never signs GxP data; technicians do not sign off). */
const ROLES_FOR: Record<SignatureInput['meaning'], Role[]> = {
  prepared: ['chemist'],
  verified: ['chemist'],
  returned: ['chemist'],
  discarded: ['chemist', 'qa'],
};

const ROLE_TEXT: Record<SignatureInput['meaning'], string> = {
  prepared: 'Only a chemist signs a record as prepared',
  verified: 'Only a chemist other than the preparer verifies a record',
  returned: 'Only a chemist other than the preparer returns a record',
  discarded: 'Only a chemist or QA discards a record',
};

// ------------------------------------------------------------------ canonical record and hash

export const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

/** The object whose canonical JSON is hashed (fields listed in the header comment). */
/** A dilution's own data entries: its aliquot records and its recomputed result (absent for stocks). */
export interface DilutionEntries {
  aliquots: DilutionAliquot[];
  result: unknown | null;
  /** set for a mix only (mix-view.ts): its components' current aliquots and results */
  mix?: MixEntries;
  /** set for a gravimetric dilution only: every readings record (gravimetric-calc.ts) */
  gravimetricReadings?: GravimetricReading[];
}

/** The canonical record version new signatures sign (see the header). */
export const CANONICAL_VERSION = 3;
export type CanonicalVersion = 1 | 2 | 3;

/** The preparation columns shown to people that canonical version 2 adds to the record (see the header). */
export function shownColumns(p: Preparation): Record<string, unknown> {
  return {
    analyteFormula: p.analyteFormula,
    target: { value: p.targetValue, unit: p.targetUnit },
    volume: { value: p.volumeValue, unit: p.volumeUnit },
    materialId: p.materialId,
    balanceId: p.balanceId,
    flaskId: p.flaskId ?? null,
    kind: (p.get('kind') as string | null | undefined) ?? 'stock',
    createdOn: p.createdOn,
    createdBy: p.createdBy,
    createdAt: p.createdAt,
    concentrationDisplay: p.concentrationDisplay ?? null,
    dilutionResult: (p.get('dilutionResult') as unknown) ?? null,
  };
}

export function recordForHash(p: Preparation, weighings: Weighing[], makeUps: MakeUp[], dilution?: DilutionEntries | null, canonicalVersion: CanonicalVersion = CANONICAL_VERSION): Record<string, unknown> {
  const base: Record<string, unknown> = {
    ...(canonicalVersion >= 2 ? { canonicalVersion, shown: shownColumns(p) } : {}),
    preparationId: p.id,
    identifier: p.identifier,
    version: p.version,
    inputs: p.inputs,
    notes: p.notes,
    conditionsUsed: p.conditionsUsed,
    snapshot: { material: p.snapshotMaterial, balance: p.snapshotBalance, flask: p.snapshotFlask },
    plan: p.plan,
    gates: p.gates,
    weighings: weighings.map((w) => ({
      id: w.id,
      mode: w.mode,
      reading: w.reading,
      before: w.beforeReading,
      after: w.afterReading,
      unit: w.unit,
      netMg: w.netMg,
      balanceId: w.balanceId,
      balanceSnapshot: w.balanceSnapshot,
      conditions: w.conditions,
      airDensity: w.airDensity,
      inWindow: Boolean(w.inWindow),
      outOfWindowReason: w.outOfWindowReason,
      supersedesId: w.supersedesId,
      correctionReason: w.correctionReason,
      recordedBy: w.recordedBy,
      recordedAt: w.recordedAt,
      ...(canonicalVersion >= 3 ? { captures: w.captures } : {}),
    })),
    makeUps: makeUps.map((m) => ({
      id: m.id,
      flaskId: m.flaskId,
      flaskIdentifier: m.flaskIdentifier,
      flaskSnapshot: m.flaskSnapshot,
      substituted: Boolean(m.substituted),
      solventId: m.solventId,
      solventLot: m.solventLot,
      solventSnapshot: m.solventSnapshot,
      solutionTemperatureC: m.solutionTemperatureC,
      applyTemperatureCorrection: Boolean(m.applyTemperatureCorrection),
      correctionReason: m.correctionReason,
      supersedesId: m.supersedesId,
      recordedBy: m.recordedBy,
      recordedAt: m.recordedAt,
    })),
    result: p.result,
    // the expiry as signed: a QA expiry extension at this version leaves the hashed expiry as it was (expiry-extension.ts)
    ...expiryAsSigned(p),
  };
  if (!dilution) return base;
  if (dilution.mix) return { ...base, ...mixHashFields(dilution.mix) }; // a mix: aliquots with their component, every component's result
  if (dilution.gravimetricReadings) return { ...base, ...gravimetricHashFields(dilution.gravimetricReadings, dilution.result, canonicalVersion) }; // a gravimetric dilution: its readings and stored result
  return {
    ...base,
    aliquots: dilution.aliquots.map((a) => ({
      id: a.id,
      pipetteId: a.pipetteId,
      pipetteIdentifier: a.pipetteIdentifier,
      pipetteSnapshot: a.pipetteSnapshot,
      volumeMl: a.volumeMl,
      supersedesId: a.supersedesId,
      correctionReason: a.correctionReason,
      recordedBy: a.recordedBy,
      recordedAt: a.recordedAt,
    })),
    dilutionResult: dilution.result ?? null,
  };
}

/**
 * A gravimetric dilution's own entries in the hashed record: every readings record (superseded ones too), oldest
 * first, each { id, balanceId, balanceSnapshot, unit, aliquotReading, finalReading, conditions, airDensity,
 * airDensityU, supersedesId, correctionReason, recordedBy, recordedAt }, and the stored result (dilutionResult).
 */
function gravimetricHashFields(readings: GravimetricReading[], result: unknown, canonicalVersion: CanonicalVersion): Record<string, unknown> {
  return {
    gravimetricReadings: readings.map((r) => ({
      id: r.id,
      balanceId: r.balanceId,
      balanceSnapshot: r.balanceSnapshot,
      unit: r.unit,
      aliquotReading: r.aliquotReading,
      finalReading: r.finalReading,
      conditions: r.conditions,
      airDensity: r.airDensity,
      airDensityU: r.airDensityU,
      supersedesId: r.supersedesId,
      correctionReason: r.correctionReason,
      recordedBy: r.recordedBy,
      recordedAt: r.recordedAt,
      ...(canonicalVersion >= 3 ? { captures: r.captures } : {}),
    })),
    dilutionResult: result ?? null,
  };
}

export function canonicalRecord(p: Preparation, weighings: Weighing[], makeUps: MakeUp[], dilution?: DilutionEntries | null, canonicalVersion: CanonicalVersion = CANONICAL_VERSION): { canonical: string; hash: string } {
  const canonical = canonicalJson(recordForHash(p, weighings, makeUps, dilution, canonicalVersion));
  return { canonical, hash: sha256(canonical) };
}

/** For a dilution (or series level): its aliquot records and recomputed result; null for a stock. */
export async function dilutionEntriesOf(p: Preparation, transaction?: Transaction): Promise<DilutionEntries | null> {
  const { kind } = await lineageRow(p.id, transaction);
  if (kind === 'mix') {
    const mix = await mixEntriesOf(p, await getSettings(transaction), transaction);
    return mix ? { aliquots: mix.aliquots, result: mix.results, mix } : null;
  }
  if (!isDilutionKind(kind)) return null;
  if (isGravimetricPlan(p)) {
    const [readings, gs] = await Promise.all([readingsOf(p.id, transaction), getSettings(transaction)]);
    return { aliquots: [], result: (await gravimetricResultOf(p, gs, transaction)) ?? null, gravimetricReadings: readings };
  }
  const [aliquots, settings] = await Promise.all([DilutionAliquot.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], transaction }), getSettings(transaction)]);
  const result = await dilutionResultOf(p, settings, transaction);
  return { aliquots, result: result ?? null };
}

async function entriesOf(p: Preparation, transaction?: Transaction) {
  const [weighings, makeUps, dilution] = await Promise.all([
    Weighing.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], transaction }),
    MakeUp.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], transaction }),
    dilutionEntriesOf(p, transaction),
  ]);
  return { weighings, makeUps, dilution };
}

/** The canonical JSON and hash of the record as it is now. */
export async function currentRecordHash(preparationId: number, transaction?: Transaction): Promise<{ canonical: string; hash: string; version: number; hashV1: string; hashV2: string }> {
  const p = await Preparation.findByPk(preparationId, { transaction });
  if (!p) throw AppError.notFound(`Preparation ${preparationId}`);
  const { weighings, makeUps, dilution } = await entriesOf(p, transaction);
  return { ...canonicalRecord(p, weighings, makeUps, dilution), version: p.version, hashV1: canonicalRecord(p, weighings, makeUps, dilution, 1).hash, hashV2: canonicalRecord(p, weighings, makeUps, dilution, 2).hash };
}

export async function storeVersion(p: Preparation, canonical: string, hash: string, at: string, transaction: Transaction) {
  const existing = await RecordVersion.findOne({ where: { preparationId: p.id, version: p.version, recordHash: hash }, transaction });
  if (!existing) await RecordVersion.create({ preparationId: p.id, version: p.version, canonicalJson: canonical, recordHash: hash, createdAt: at }, { transaction });
}

export interface SignatureCheck {
  signatureId: number;
  meaning: SignatureMeaning;
  recordVersion: number;
  ok: boolean;
  problem?: string;
}

/**
 * Integrity check of every signature on a record: the stored version it names exists for this record, its
 * canonical JSON hashes to the signature's recordHash and names this record and version; a signature that
 * claims the current version must match the record as it is now.
 */
export async function verifySignatures(preparationId: number): Promise<SignatureCheck[]> {
  const sigs = await Signature.findAll({ where: { preparationId }, order: [['id', 'ASC']] });
  const now = await currentRecordHash(preparationId);
  const out: SignatureCheck[] = [];
  for (const s of sigs) {
    const base = { signatureId: s.id, meaning: s.meaning, recordVersion: s.recordVersion };
    const rv = await RecordVersion.findOne({ where: { preparationId, version: s.recordVersion, recordHash: s.recordHash } });
    let problem: string | undefined;
    if (!rv) problem = `no stored version ${s.recordVersion} of this record has the signed hash`;
    else if (sha256(rv.canonicalJson) !== s.recordHash) problem = 'the stored version does not hash to the signed hash';
    else {
      const signed = JSON.parse(rv.canonicalJson) as { preparationId?: number; version?: number };
      if (signed.preparationId !== preparationId) problem = `the signed content belongs to preparation ${signed.preparationId}`;
      else if (signed.version !== s.recordVersion) problem = `the signed content is version ${signed.version}, not ${s.recordVersion}`;
      else if (s.recordVersion === now.version && s.recordHash !== now.hash && s.recordHash !== now.hashV2 && s.recordHash !== now.hashV1) problem = `the record changed without a new version since it was signed at version ${s.recordVersion}`;
    }
    out.push(problem ? { ...base, ok: false, problem } : { ...base, ok: true });
  }
  return out;
}

// ------------------------------------------------------------------ who may sign what

interface State {
  p: Preparation;
  weighings: Weighing[];
  makeUps: MakeUp[];
  /** set for a dilution or series level; null for a stock */
  dilution: DilutionEntries | null;
  sigs: Signature[];
  /** the hash of the record as it is now (canonical version 3) */
  hash: string;
  /** the same under canonical version 1, for signatures written before version 2 (computed when asked) */
  hashV1: () => string;
  /** the same under canonical version 2, for signatures written before version 3 (computed when asked) */
  hashV2: () => string;
}

/** A signature is valid while it names the current version and that version's hash, under the canonical version it was signed in. */
const isValid = (s: Signature, st: Pick<State, 'p' | 'hash' | 'hashV1' | 'hashV2'>) => s.recordVersion === st.p.version && (s.recordHash === st.hash || s.recordHash === st.hashV2() || s.recordHash === st.hashV1());

function stateOf(p: Preparation, weighings: Weighing[], makeUps: MakeUp[], dilution: DilutionEntries | null, sigs: Signature[]): State {
  let v1: string | undefined;
  let v2: string | undefined;
  return {
    p,
    weighings,
    makeUps,
    dilution,
    sigs,
    hash: canonicalRecord(p, weighings, makeUps, dilution).hash,
    hashV1: () => (v1 ??= canonicalRecord(p, weighings, makeUps, dilution, 1).hash),
    hashV2: () => (v2 ??= canonicalRecord(p, weighings, makeUps, dilution, 2).hash),
  };
}

function activeWeighing(weighings: Weighing[]): Weighing | undefined {
  const superseded = new Set(weighings.map((w) => w.supersedesId).filter((x): x is number => x !== null));
  return weighings.filter((w) => !superseded.has(w.id)).at(-1);
}

/**
 * Everyone who cannot verify the current version, with the reason (RV-02): the planner (the plan is part of
 * every version), the recorders of the current weighing and make-up, anyone who entered data since the last
 * amendment, the amender, and whoever signed the current version "prepared".
 */
export function excludedVerifiers(st: State): Map<number, string> {
  const out = new Map<number, string>();
  const add = (id: number, why: string) => {
    if (!out.has(id)) out.set(id, why);
  };
  const lastAmend = [...st.sigs].reverse().find((s) => s.meaning === 'amended');
  for (const s of st.sigs) if (s.meaning === 'prepared' && isValid(s, st)) add(s.signerId, 'you signed this version as prepared');
  if (lastAmend) add(lastAmend.signerId, `you amended this record (version ${lastAmend.recordVersion})`);
  add(st.p.createdBy, 'you planned this record');
  const w = activeWeighing(st.weighings);
  if (w) add(w.recordedBy, 'you recorded the weighing in this version');
  const a = st.dilution ? activeAliquot(st.dilution.aliquots) : undefined;
  if (a) add(a.recordedBy, 'you recorded the aliquot in this version');
  for (const c of st.dilution?.mix?.current ?? []) add(c.recordedBy, "you recorded a component's aliquot in this version");
  const g = st.dilution?.gravimetricReadings ? activeReadings(st.dilution.gravimetricReadings) : undefined;
  if (g) add(g.recordedBy, 'you recorded the readings in this version');
  for (const e of st.dilution?.gravimetricReadings ?? []) if (e.recordedAt >= (lastAmend?.signedAt ?? '')) add(e.recordedBy, 'you entered or changed data in this version');
  const m = st.makeUps.at(-1);
  if (m) add(m.recordedBy, 'you recorded the make-up in this version');
  const since = lastAmend?.signedAt ?? '';
  for (const e of [...st.weighings, ...(st.dilution?.aliquots ?? []), ...st.makeUps]) if (e.recordedAt >= since) add(e.recordedBy, 'you entered or changed data in this version');
  return out;
}

function completeness(st: State): string | null {
  if (st.dilution?.mix) return mixCompleteness(st.dilution.mix, st.makeUps.length > 0);
  if (st.dilution?.gravimetricReadings) {
    if (!activeReadings(st.dilution.gravimetricReadings)) return 'record both readings (aliquot and final solution) first';
    if (!st.dilution.result) return 'the dilution result has not been computed';
    return null;
  }
  if (st.dilution) {
    if (!activeAliquot(st.dilution.aliquots)) return 'record the aliquot first';
    if (!st.makeUps.length) return 'record the make-up first';
    if (!st.dilution.result) return 'the dilution result has not been computed';
    return null;
  }
  if (!activeWeighing(st.weighings)) return 'record the weighing first';
  if (!st.makeUps.length) return 'record the make-up first';
  if (!st.p.result) return 'the result has not been computed';
  return null;
}

// ------------------------------------------------------------------ results the plan could not produce

type Shown = PlanValue & { display?: string };

/** Messages for every current result outside what the plan could produce ([] when none, or no result yet). */
export function outOfPlanMessages(st: Pick<State, 'p' | 'dilution'>): string[] {
  const p = st.p;
  const target: PlanValue = { value: p.targetValue, unit: p.targetUnit };
  const out: Array<string | null> = [];
  if (st.dilution?.mix) {
    const plan = mixPlanOf(p);
    for (const r of (st.dilution.result as Array<Shown & { analyteFormula: string }> | null) ?? []) {
      const planned = plan?.components.find((c) => c.analyteFormula === r.analyteFormula)?.planned;
      if (planned) out.push(outOfPlan(r, planned, `The ${r.analyteFormula} result`));
    }
  } else if (st.dilution?.gravimetricReadings) {
    const r = st.dilution.result as { massFraction?: Shown } | null;
    if (r?.massFraction) out.push(outOfPlan(r.massFraction, target));
  } else if (st.dilution) {
    const r = st.dilution.result as Shown | null;
    if (r) out.push(outOfPlan(r, target));
  } else if (p.result?.concentration) {
    out.push(outOfPlan(p.result.concentration, target));
  }
  return out.filter((m): m is string => m !== null);
}

/** The out-of-plan section of the detail: the messages, and the reason stated with the valid "prepared" signature. */
function resultOutOfPlanOf(st: State): ResultOutOfPlan | undefined {
  const messages = outOfPlanMessages(st);
  if (!messages.length) return undefined;
  const prepared = [...st.sigs].reverse().find((s) => s.meaning === 'prepared' && isValid(s, st) && s.outOfPlanReason);
  return prepared ? { messages, reason: prepared.outOfPlanReason!, statedBy: prepared.signerName, statedAt: prepared.signedAt } : { messages };
}

/** The verifier's checklist of this record: a result outside the plan comes first, with the reason stated for it. */
export function checklistOf(st: State): ChecklistItem[] {
  const items = VERIFICATION_CHECKLIST.map((c) => ({ ...c }));
  const o = resultOutOfPlanOf(st);
  if (!o) return items;
  const why = o.reason ? `Reason stated by ${o.statedBy} when signing as prepared: "${o.reason}".` : 'No reason was stated when it was signed as prepared.';
  return [{ key: OUT_OF_PLAN_CHECK_KEY, label: `Result outside the plan reviewed: ${o.messages.join('; ')}. ${why} The result and its reason are justified.` }, ...items];
}

function refusal(st: State, meaning: SignatureInput['meaning'], user: { id: number; role: Role }): { status: number; code: string; message: string } | null {
  const id = st.p.identifier;
  if (!ROLES_FOR[meaning].includes(user.role)) return { status: 403, code: 'forbidden', message: ROLE_TEXT[meaning] };
  const event = EVENT_OF[meaning];
  if (!nextStatus(st.p.status, event)) return { status: 409, code: 'invalid_transition', message: invalidTransition(id, st.p.status, event).message };
  if (meaning === 'prepared') {
    const missing = completeness(st);
    if (missing) return { status: 409, code: 'invalid_transition', message: invalidTransition(id, st.p.status, event, missing).message };
  }
  if (meaning === 'verified' || meaning === 'returned') {
    const why = excludedVerifiers(st).get(user.id);
    if (why) return { status: 403, code: 'self_verification', message: `You cannot ${meaning === 'verified' ? 'verify' : 'return'} ${id}: ${why}. A second chemist must review it.` };
  }
  return null;
}

async function loadState(p: Preparation, transaction?: Transaction): Promise<State> {
  const [{ weighings, makeUps, dilution }, sigs] = await Promise.all([entriesOf(p, transaction), Signature.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], transaction })]);
  return stateOf(p, weighings, makeUps, dilution, sigs);
}

function signatureDto(s: Signature, st: Pick<State, 'p' | 'hash' | 'hashV1' | 'hashV2'>): SignatureDto {
  const dto: SignatureDto = {
    id: s.id,
    meaning: s.meaning,
    meaningText: s.meaningText,
    signer: { id: s.signerId, fullName: s.signerName },
    signedAt: s.signedAt,
    recordVersion: s.recordVersion,
    recordHash: s.recordHash,
    valid: isValid(s, st),
  };
  if (s.reason) dto.reason = s.reason;
  if (s.outOfPlanReason) dto.outOfPlanReason = s.outOfPlanReason;
  if (s.checklist) dto.checklist = s.checklist;
  return dto;
}

type SignatureView = Pick<PreparationDetail, 'signatures' | 'verificationChecklist' | 'canSign'> & Partial<Pick<PreparationDetail, 'amendedFromVersion' | 'reviewFlag' | 'resultOutOfPlan' | 'status' | 'sealBroken'>>;

const SEAL_BROKEN_REFUSAL = (id: string) => `${id} no longer matches its signatures (seal broken): QA must investigate; it can only be discarded`;

/** The signature fields of PreparationDetail, with canSign for the viewing user (none: all false). */
export async function signatureView(p: Preparation, weighings: Weighing[], makeUps: MakeUp[], viewerId?: number): Promise<SignatureView> {
  const [sigs, flag, viewer, ack, dilution] = await Promise.all([
    Signature.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
    ReviewFlag.findOne({ where: { preparationId: p.id }, order: [['id', 'DESC']] }),
    viewerId ? User.findByPk(viewerId) : Promise.resolve(null),
    viewerId ? SignatureAcknowledgement.findByPk(viewerId) : Promise.resolve(null),
    dilutionEntriesOf(p),
  ]);
  const st = stateOf(p, weighings, makeUps, dilution, sigs);
  const sealBroken = await fullSealCheck(p, sigs, st, shownColumns); // a signed record whose data no longer match (record-integrity.ts)
  const canSign: CanSign = { prepare: false, verify: false, return: false, discard: false, reasons: {} };
  const actions = { prepare: 'prepared', verify: 'verified', return: 'returned', discard: 'discarded' } as const;
  for (const [action, meaning] of Object.entries(actions) as Array<[keyof typeof actions, SignatureInput['meaning']]>) {
    const why = viewer ? (sealBroken && meaning !== 'discarded' ? { message: SEAL_BROKEN_REFUSAL(p.identifier) } : refusal(st, meaning, { id: viewer.id, role: viewer.role })) : { message: 'Sign in to sign' };
    if (why) canSign.reasons[action] = why.message;
    else canSign[action] = true;
  }
  if (viewer) canSign.acknowledgementRequired = !ack;
  const view: SignatureView = {
    signatures: sigs.map((s) => signatureDto(s, st)),
    verificationChecklist: checklistOf(st),
    canSign,
  };
  const outOfPlanView = resultOutOfPlanOf(st);
  if (outOfPlanView) view.resultOutOfPlan = outOfPlanView;
  const lastAmend = [...sigs].reverse().find((s) => s.meaning === 'amended');
  if (lastAmend?.amendsVersion) view.amendedFromVersion = lastAmend.amendsVersion;
  if (flag) view.reviewFlag = { reason: flag.reason, flaggedAt: flag.flaggedAt };
  if (sealBroken) {
    view.status = SEAL_BROKEN; // overrides the summary's status in the detail (preparations.service detailOf spreads this after it)
    view.sealBroken = sealBroken;
  }
  return view;
}

/** The full seal check of one record (record-integrity.ts), loading its entries; null while the seal holds. */
export async function recordSeal(p: Preparation): Promise<SealBroken | null> {
  const st = await loadState(p);
  return fullSealCheck(p, st.sigs, st, shownColumns);
}

/** Why `user` may not sign `p` "verified" now (null: they may); used by the home page's work lists. */
export async function verifyRefusal(p: Preparation, user: { id: number; role: Role }): Promise<string | null> {
  return refusal(await loadState(p), 'verified', user)?.message ?? null;
}

// ------------------------------------------------------------------ password (two components, ES-04)

const LOCKED = () => new AppError('account_locked', 423, 'This account is locked after repeated failed passwords; ask an administrator to unlock it');

/**
 * Checks the signer's password against their stored hash. A failure is counted towards the lockout and
 * audited in its own committed transaction, then 401 signature_password (423 once locked). `entity` names the
 * signed record's kind in the audit entry (a preparation unless given, e.g. 'volume_check').
 */
export async function checkSignerPassword(user: User, password: string, what: string, preparationId: number, lockoutThreshold: number, entity = 'preparation'): Promise<void> {
  if (user.lockedAt) throw LOCKED();
  // A password an administrator set is known to someone else: it signs nothing (21 CFR 11.300).
  if (user.mustChangePassword) throw new AppError(PASSWORD_CHANGE_REQUIRED, 403, 'Choose your own password before signing: the current one was set by an administrator');
  if (await verifyPassword(password, user.passwordHash)) return;
  let nowLocked = false;
  await writeTransaction(async (transaction) => {
    await user.reload({ transaction });
    const before = user.failedLoginCount ?? 0;
    user.failedLoginCount = before + 1;
    nowLocked = !user.lockedAt && user.failedLoginCount >= lockoutThreshold;
    if (nowLocked) user.lockedAt = new Date().toISOString();
    await user.save({ transaction });
    const actor = { id: user.id, fullName: user.fullName };
    await recordAudit(
      { actor, action: 'signature_failed', entity, entityId: preparationId, changes: [{ field: 'failedLoginCount', oldValue: before, newValue: user.failedLoginCount }], reason: `Wrong password when signing ${what}` },
      transaction,
    );
    if (nowLocked) {
      const ended = await endUserSessions(user.id, 'locked', transaction);
      await recordAudit(
        { actor: null, action: 'account_locked', entity: 'user', entityId: user.id, changes: [{ field: 'locked', oldValue: false, newValue: true }, { field: 'sessionsEnded', oldValue: null, newValue: ended }], reason: `${user.failedLoginCount} consecutive failed passwords (sign-in or signing)` },
        transaction,
      );
    }
  });
  if (nowLocked) throw LOCKED();
  throw new AppError('signature_password', 401, 'The password is not correct; the record was not signed', { fields: { password: 'The password is not correct' } });
}

export async function resetFailures(user: User, transaction: Transaction) {
  await user.reload({ transaction });
  if ((user.failedLoginCount ?? 0) !== 0) {
    user.failedLoginCount = 0;
    await user.save({ transaction });
  }
}

// ------------------------------------------------------------------ signing

async function findByKey(key: string): Promise<Preparation> {
  let p: Preparation | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) p = await Preparation.findByPk(Number(key));
  else if (parsePreparationId(key)) p = await Preparation.findOne({ where: { identifier: key } });
  if (!p) throw AppError.notFound(`Preparation ${key}`);
  return p;
}

function recordRef(p: Preparation): RecordRef {
  return { identifier: p.identifier, materialName: p.snapshotMaterial.name, analyteFormula: p.analyteFormula, concentrationDisplay: p.concentrationDisplay, version: p.version };
}

async function mailsFor(meaning: SignatureInput['meaning'], st: State, signer: Signer, reason: string | undefined, publicUrl: string): Promise<QueuedMail[]> {
  const ref = recordRef(st.p);
  const base = { preparationId: st.p.id };
  if (meaning === 'prepared') {
    const chemists = await User.findAll({ where: { role: 'chemist', active: true }, order: [['id', 'ASC']] });
    const content = verificationRequestedMail(ref, signer.fullName, publicUrl);
    return chemists.filter((c) => c.id !== signer.id && !c.lockedAt).map((c) => ({ ...base, ...content, kind: 'verification_requested', to: c.email }));
  }
  if (meaning === 'returned' || meaning === 'verified') {
    const prepared = [...st.sigs].reverse().find((s) => s.meaning === 'prepared' && isValid(s, st));
    const preparer = prepared ? await User.findByPk(prepared.signerId) : null;
    if (!preparer) return [];
    const content = meaning === 'returned' ? returnedMail(ref, signer.fullName, reason ?? '', publicUrl) : verifiedMail(ref, signer.fullName, publicUrl);
    return [{ ...base, ...content, kind: meaning, to: preparer.email }];
  }
  return [];
}

async function auditRefusal(signer: Signer, p: Preparation, meaning: string, message: string) {
  await writeTransaction((transaction) =>
    recordAudit({ actor: signer, action: 'signature_refused', entity: 'preparation', entityId: p.id, changes: [{ field: 'meaning', oldValue: null, newValue: meaning }, { field: 'recordVersion', oldValue: null, newValue: p.version }], reason: message }, transaction),
  );
}

/** POST /api/preparations/:key/signatures. Returns the preparation id; the route sends the detail. */
export async function sign(key: string, input: SignatureInput, signer: Signer, opts: SignOptions): Promise<number> {
  const now = opts.now ?? new Date();
  const p = await findByKey(key);
  const user = await User.findByPk(signer.id);
  if (!user || !user.active) throw new AppError('unauthenticated', 401, 'Sign in to continue');
  const st = await loadState(p);
  const refused = refusal(st, input.meaning, { id: user.id, role: user.role });
  if (!refused && input.meaning !== 'discarded' && (await fullSealCheck(p, st.sigs, st, shownColumns))) throw new AppError(SEAL_BROKEN, 409, SEAL_BROKEN_REFUSAL(p.identifier));
  if (refused) {
    if (refused.code === 'self_verification') await auditRefusal(signer, p, input.meaning, refused.message);
    throw new AppError(refused.code, refused.status, refused.message);
  }
  const outOfPlanNow = input.meaning === 'prepared' ? outOfPlanMessages(st) : [];
  if (outOfPlanNow.length && (input.outOfPlanReason === undefined || input.outOfPlanReason.length < 3)) {
    const msg = `${outOfPlanNow.join('; ')}. State why the result stands (at least 3 characters) to sign it as prepared, or correct the entries`;
    throw new AppError('result_out_of_plan', 422, msg, { fields: { outOfPlanReason: msg } });
  }
  const checklist = checklistOf(st);
  if (input.meaning === 'verified') {
    const missing = checklist.filter((c) => input.checklist?.[c.key] !== true);
    if (missing.length) {
      throw AppError.validation(`Tick every checklist item before verifying (${missing.length} not ticked)`, Object.fromEntries(missing.map((c) => [`checklist.${c.key}`, `Tick: ${c.label}`])));
    }
  }
  const acknowledged = await SignatureAcknowledgement.findByPk(user.id);
  if (!acknowledged && input.acknowledgeResponsibility !== true) {
    throw AppError.validation('Acknowledge the signature statement before your first signature', { acknowledgeResponsibility: SIGNATURE_RESPONSIBILITY_STATEMENT });
  }
  await checkSignerPassword(user, input.password, `"${input.meaning}"`, p.id, opts.lockoutThreshold);

  const at = now.toISOString();
  await writeTransaction(async (transaction) => {
    await p.reload({ transaction });
    const fresh = await loadState(p, transaction);
    if (fresh.hash !== st.hash || p.status !== st.p.status) {
      throw new AppError('conflict', 409, `${p.identifier} changed while you were signing (now version ${p.version}, state '${p.status}'); review it again`);
    }
    const from = p.status;
    const to = transition(p.identifier, from, EVENT_OF[input.meaning]);
    const { canonical, hash } = canonicalRecord(p, fresh.weighings, fresh.makeUps, fresh.dilution);
    await storeVersion(p, canonical, hash, at, transaction);
    if (!acknowledged) await SignatureAcknowledgement.create({ userId: user.id, statement: SIGNATURE_RESPONSIBILITY_STATEMENT, acknowledgedAt: at }, { transaction });
    await resetFailures(user, transaction);
    const s = await Signature.create(
      {
        preparationId: p.id,
        meaning: input.meaning,
        meaningText: SIGNATURE_MEANING_TEXT[input.meaning],
        signerId: user.id,
        signerName: user.fullName,
        signedAt: at,
        recordVersion: p.version,
        recordHash: hash,
        reason: input.reason ? input.reason : null,
        checklist: input.meaning === 'verified' ? Object.fromEntries(checklist.map((c) => [c.key, true as const])) : null,
        amendsVersion: null,
        outOfPlanReason: outOfPlanNow.length ? input.outOfPlanReason! : null,
      },
      { transaction },
    );
    p.status = to;
    p.updatedAt = at;
    await p.save({ transaction });
    await PreparationEvent.create({ preparationId: p.id, status: to, note: input.reason ? input.reason : null, byId: user.id, byName: user.fullName, at }, { transaction });
    await recordAudit(
      {
        actor: { id: user.id, fullName: user.fullName },
        action: 'sign',
        entity: 'preparation',
        entityId: p.id,
        changes: [
          { field: 'status', oldValue: from, newValue: to },
          { field: 'signature.meaning', oldValue: null, newValue: input.meaning },
          { field: 'signature.recordVersion', oldValue: null, newValue: p.version },
          { field: 'signature.recordHash', oldValue: null, newValue: hash },
          { field: 'signature.id', oldValue: null, newValue: s.id },
          ...(s.outOfPlanReason ? [{ field: 'signature.outOfPlanReason', oldValue: null, newValue: s.outOfPlanReason }, { field: 'signature.resultOutOfPlan', oldValue: null, newValue: outOfPlanNow.join('; ') }] : []),
        ],
        reason: input.reason ?? null,
      },
      transaction,
    );
    await enqueueMail(await mailsFor(input.meaning, { ...fresh, sigs: [...fresh.sigs, s] }, signer, input.reason, opts.publicUrl), transaction, now);
  });
  opts.mailer?.kick();
  return p.id;
}

// ------------------------------------------------------------------ changes to a signed record (CO-01, CO-02)

export interface PendingAmendment {
  fromVersion: number;
  reason: string;
  user: User;
  acknowledge: boolean;
}

/**
 * Before a weighing or make-up is stored: null when the record is planned (no signature needed); 409 when it is
 * closed (expired, discarded); for a signed record, the chemist's reason and password are checked (401 counted)
 * and the amendment to record in the same transaction as the change is returned.
 */
export async function checkChange(p: Preparation, actor: Signer, signature: ChangeSignatureInput | undefined, reason: string | undefined | null, opts: { lockoutThreshold: number }): Promise<PendingAmendment | null> {
  if (dataEntryMode(p.identifier, p.status) === 'free') return null;
  const user = await User.findByPk(actor.id);
  if (!user || !user.active) throw new AppError('unauthenticated', 401, 'Sign in to continue');
  if (user.role !== 'chemist') {
    throw new AppError('forbidden', 403, `${p.identifier} is signed ('${p.status}'): only a chemist can amend it, with a reason and an "amended" signature`);
  }
  if (!reason || reason.trim().length < 3) {
    throw AppError.validation(`${p.identifier} is signed: give the reason for the change`, { correctionReason: `${p.identifier} is signed ('${p.status}'): give the reason for the change` });
  }
  if (!signature?.password) {
    throw AppError.validation(`${p.identifier} is signed: enter your password to sign the amendment`, { 'signature.password': `${p.identifier} is signed ('${p.status}'): enter your password to sign the change as "amended"` });
  }
  const acknowledged = await SignatureAcknowledgement.findByPk(user.id);
  if (!acknowledged && signature.acknowledgeResponsibility !== true) {
    throw AppError.validation('Acknowledge the signature statement before your first signature', { 'signature.acknowledgeResponsibility': SIGNATURE_RESPONSIBILITY_STATEMENT });
  }
  await checkSignerPassword(user, signature.password, 'an amendment', p.id, opts.lockoutThreshold);
  return { fromVersion: p.version, reason: reason.trim(), user, acknowledge: !acknowledged };
}

/**
 * Inside the change's transaction, after the data change (p.version already incremented): the "amended"
 * signature on the new version, every earlier signature superseded (their version no longer matches), the
 * status back to planned, audited.
 */
export async function recordAmendment(p: Preparation, amendment: PendingAmendment, transaction: Transaction, now: Date): Promise<void> {
  const at = now.toISOString();
  const { user } = amendment;
  const from = p.status;
  const to = transition(p.identifier, from, 'amend');
  const { weighings, makeUps, dilution } = await entriesOf(p, transaction);
  const { canonical, hash } = canonicalRecord(p, weighings, makeUps, dilution);
  await storeVersion(p, canonical, hash, at, transaction);
  if (amendment.acknowledge) await SignatureAcknowledgement.create({ userId: user.id, statement: SIGNATURE_RESPONSIBILITY_STATEMENT, acknowledgedAt: at }, { transaction });
  await resetFailures(user, transaction);
  const superseded = await Signature.count({ where: { preparationId: p.id }, transaction });
  const s = await Signature.create(
    {
      preparationId: p.id,
      meaning: 'amended',
      meaningText: SIGNATURE_MEANING_TEXT.amended,
      signerId: user.id,
      signerName: user.fullName,
      signedAt: at,
      recordVersion: p.version,
      recordHash: hash,
      reason: amendment.reason,
      checklist: null,
      amendsVersion: amendment.fromVersion,
    },
    { transaction },
  );
  p.status = to;
  p.updatedAt = at;
  await p.save({ transaction });
  await PreparationEvent.create(
    { preparationId: p.id, status: to, note: `Amended after signing (v${amendment.fromVersion} → v${p.version}): ${amendment.reason}`, byId: user.id, byName: user.fullName, at },
    { transaction },
  );
  await recordAudit(
    {
      actor: { id: user.id, fullName: user.fullName },
      action: 'sign',
      entity: 'preparation',
      entityId: p.id,
      changes: [
        { field: 'status', oldValue: from, newValue: to },
        { field: 'signature.meaning', oldValue: null, newValue: 'amended' },
        { field: 'signature.recordVersion', oldValue: amendment.fromVersion, newValue: p.version },
        { field: 'signature.recordHash', oldValue: null, newValue: hash },
        { field: 'signature.id', oldValue: null, newValue: s.id },
        { field: 'signaturesSuperseded', oldValue: null, newValue: superseded },
      ],
      reason: amendment.reason,
    },
    transaction,
  );
}

/** Marks records made from `sourceId` for review (used by the lineage feature when a parent is amended). */
export async function flagForReview(preparationIds: number[], sourceId: number, reason: string, transaction: Transaction, now = new Date()): Promise<void> {
  for (const preparationId of preparationIds) {
    await ReviewFlag.create({ preparationId, sourcePreparationId: sourceId, reason, flaggedAt: now.toISOString() }, { transaction });
  }
}
