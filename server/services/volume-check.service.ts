/**
 * Stored gravimetric checks of volumetric ware (ISO 4787 / ISO 8655-6).
 *
 * - Plan (chemist, technician): from an in-service ware item and a balance; the tested volumes and replicates
 *   (piston pipette: nominal, 50 % and 10 %, 10 replicates each, ISO 8655-6; glass: nominal, n chosen by the lab);
 *   balance gates (in service and calibrated, minimum weight against the smallest water mass, readability suited
 *   to the smallest volume per ISO 8655-6's balance table, capacity against the largest mass); the conditions.
 * - Readings (chemist, technician): one net reading per replicate, verbatim, append-only; a correction is a new
 *   row naming the reading it supersedes, with a reason. When every replicate is in, the result is computed by
 *   shared/calc/volume-check.ts and stored with its calc version.
 * - Signatures (chemist): "prepared" on a complete check, then "verified" or "returned" by a second chemist who did
 *   not plan, record a reading or sign it prepared (the separation of duties of a preparation). The password is
 *   checked by signatures.service (checkSignerPassword: counted towards the lockout, audited); the first signature
 *   needs the responsibility acknowledgement. Each signature stores the record version and the SHA-256 of the
 *   canonical JSON signed. "returned" sends the check back to planned at a new version. Every write is audited.
 * - Verification sets the next due date (plan.intervalMonths after the verification day): the ware's calibration
 *   status follows from its latest verified check (wareCalibration); ware whose latest verified check failed is
 *   refused for preparations and dilutions (failedCheckOf, used by the planning gates).
 */
import type { Transaction } from 'sequelize';
import { Op } from 'sequelize';
import { D, type Dec } from '../../shared/calc/decimal.ts';
import { CalcError } from '../../shared/calc/errors.ts';
import { calculateVolumeCheck, limitFor, VOLUME_CHECK_CALC_VERSION, type VolumeCheckResponse } from '../../shared/calc/volume-check.ts';
import type { CheckWareMaterial } from '../../shared/calc/volume-tolerances.ts';
import { SIGNATURE_MEANING_TEXT, SIGNATURE_RESPONSIBILITY_STATEMENT } from '../../shared/schemas/preparations.ts';
import type { VolumeCheckPlanInput, VolumeCheckReadingInput, VolumeCheckSignatureInput } from '../../shared/schemas/volume-check.ts';
import { Balance, SignatureAcknowledgement, User, VolumeCheck, VolumeCheckReading, VolumeCheckSignature, VolumetricWare } from '../db/models/index.ts';
import type { VolumeCheckPlan } from '../db/models/volume-check.model.ts';
import { canonicalJson, writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { renderVolumeCheckCertificate } from '../pdf/volume-check-certificate.tsx';
import { recordAudit } from './audit.service.ts';
import { labDate } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';
import { checkSignerPassword, resetFailures, sha256 } from './signatures.service.ts';

export interface Actor {
  id: number;
  fullName: string;
}

export interface WriteOptions {
  now?: Date;
}

/** Verifier's checklist of a volume check (shown before signing "verified"). */
export const VOLUME_CHECK_CHECKLIST = [
  { key: 'balance_fit', label: 'Balance in calibration, readability and minimum weight suited to the smallest volume' },
  { key: 'conditions', label: 'Water and air conditions recorded and plausible' },
  { key: 'readings', label: 'Every reading and correction reviewed (reasons given)' },
  { key: 'limits', label: 'Limit and its source appropriate for this ware' },
] as const;

// ------------------------------------------------------------------ ware → plan

const CHECKABLE = ['bulb_pipette', 'volumetric_flask', 'piston_pipette', 'burette'] as const;

/** The ware's material text in the inventory → the core's material (null when not recognised). */
export function materialOf(text: string | null): CheckWareMaterial | null {
  const t = (text ?? '').toLowerCase();
  if (/boro/.test(t)) return 'borosilicate_3_3';
  if (/soda|ar[- ]?glass/.test(t)) return 'soda_lime';
  if (/polyprop|\bpp\b/.test(t)) return 'polypropylene';
  return null;
}

/**
 * ISO 8655-6 balance requirements (readability by selected volume), from memory: ≤ 10 µL 0.001 mg; ≤ 100 µL
 * 0.01 mg; ≤ 10 mL 0.1 mg; ≤ 200 mL 1 mg. Larger volumes (ISO 4787 flasks): 10 mg up to 2000 mL (common practice).
 */
export function requiredReadabilityMg(volumeMl: Dec): string {
  if (volumeMl.lte('0.010')) return '0.001';
  if (volumeMl.lte('0.100')) return '0.01';
  if (volumeMl.lte('10')) return '0.1';
  if (volumeMl.lte('200')) return '1';
  return '10';
}

type GateResult = { code: string; pass: boolean; message: string };

function balanceGates(b: Balance, testedMl: Dec[], today: string): GateResult[] {
  const smallestMg = D.min(...testedMl).mul('997'); // water ≈ 0.997 g/mL at 25 °C: the lightest it can be
  const largestG = D.max(...testedMl).mul('1.0');
  const gates: GateResult[] = [];
  const inCal = b.status === 'in_service' && !!b.calibrationDueOn && b.calibrationDueOn >= today;
  gates.push({
    code: 'balance_calibration',
    pass: inCal,
    message: b.status !== 'in_service' ? `${b.identifier} is ${b.status.replace(/_/g, ' ')}` : b.calibrationDueOn ? `${b.identifier} calibration due ${b.calibrationDueOn}${inCal ? '' : ' (overdue)'}` : `${b.identifier} has no calibration due date`,
  });
  const sf = new D(b.minWeightSafetyFactor ?? '1');
  const minMg = b.minWeightMg ? new D(b.minWeightMg).mul(sf) : null;
  gates.push({
    code: 'balance_min_weight',
    pass: minMg === null ? false : smallestMg.gte(minMg),
    message: minMg === null ? `${b.identifier} has no minimum weight recorded` : `smallest water mass about ${smallestMg.toDecimalPlaces(1).toFixed()} mg against the minimum weight ${minMg.toFixed()} mg of ${b.identifier}`,
  });
  const need = requiredReadabilityMg(D.min(...testedMl));
  gates.push({
    code: 'balance_readability',
    pass: new D(b.readabilityMg).lte(need),
    message: `${b.identifier} reads ${b.readabilityMg} mg; ISO 8655-6 asks for ${need} mg or finer at ${D.min(...testedMl).toFixed()} mL (from memory)`,
  });
  gates.push({ code: 'balance_capacity', pass: largestG.lte(b.capacityG), message: `largest water mass about ${largestG.toFixed()} g against the capacity ${b.capacityG} g of ${b.identifier}` });
  return gates;
}

function testedVolumes(kind: string, nominalMl: string, replicates: number | undefined): VolumeCheckPlan['tested'] {
  if (kind === 'piston_pipette') {
    const n = new D(nominalMl);
    const tenth = n.mul('0.1');
    return [n, n.mul('0.5'), tenth].map((v) => ({ value: v.toFixed(), unit: 'mL', replicates: 10 }));
  }
  return [{ value: nominalMl, unit: 'mL', replicates: replicates ?? 10 }];
}

async function nextIdentifier(year: string, transaction: Transaction): Promise<string> {
  const count = await VolumeCheck.count({ where: { identifier: { [Op.like]: `VC-${year}-%` } }, transaction });
  return `VC-${year}-${String(count + 1).padStart(4, '0')}`;
}

/** POST /api/volume-checks */
export async function planVolumeCheck(input: VolumeCheckPlanInput, actor: Actor, opts: WriteOptions = {}): Promise<VolumeCheckDetail> {
  const now = opts.now ?? new Date();
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const [w, b] = await Promise.all([VolumetricWare.findByPk(input.wareId), Balance.findByPk(input.balanceId)]);
  const fields: Record<string, string> = {};
  if (!w) fields.wareId = `No volumetric ware with id ${input.wareId} is registered`;
  if (!b) fields.balanceId = `No balance with id ${input.balanceId} is registered`;
  if (w && !(CHECKABLE as readonly string[]).includes(w.kind)) fields.wareId = `${w.identifier} is a ${w.kind.replace(/_/g, ' ')}; checks cover bulb and piston pipettes, flasks and burettes`;
  if (w && w.status === 'retired') fields.wareId = `${w.identifier} is retired`;
  const material = input.material ?? (w ? materialOf(w.material) : null);
  if (w && !material) fields.material = `The material of ${w.identifier} ("${w.material ?? ''}") is not recognised; choose borosilicate_3_3, soda_lime or polypropylene`;
  if (w && w.kind === 'piston_pipette' && input.replicates !== undefined) fields.replicates = 'Piston pipettes are checked with 10 replicates at each tested volume (ISO 8655-6)';
  if (Object.keys(fields).length) throw AppError.validation(Object.values(fields)[0]!, fields);
  const ware = w!;
  const balance = b!;
  const tested = testedVolumes(ware.kind, ware.nominalVolumeMl, input.replicates);
  const cls = ware.wareClass === 'n/a' ? null : ware.wareClass;
  const plan: VolumeCheckPlan = {
    kind: ware.kind as VolumeCheckPlan['kind'],
    class: cls,
    material: material!,
    mode: ware.kind === 'volumetric_flask' ? 'content' : 'delivery',
    nominal: { value: ware.nominalVolumeMl, unit: 'mL' },
    tested,
    intervalMonths: input.intervalMonths ?? 12,
  };
  // the standard's table where it has a row; else the tolerance in the inventory, named as the lab's limit
  try {
    limitFor({ ...plan, nominal: plan.nominal }, 'mL');
  } catch (e) {
    if (!(e instanceof CalcError)) throw e;
    if (!ware.toleranceMl) throw AppError.validation(e.message, { wareId: `${ware.identifier}: ${e.message}` });
    plan.limits = { systematic: { value: ware.toleranceMl, unit: 'mL' }, source: `tolerance recorded for ${ware.identifier} in the inventory` };
  }
  const gates = balanceGates(balance, tested.map((t) => new D(t.value)), today);
  const failed = gates.filter((g) => !g.pass);
  if (failed.length) throw AppError.validation(`${balance.identifier} cannot be used for this check: ${failed.map((g) => g.message).join('; ')}`, { balanceId: failed.map((g) => g.message).join('; ') });
  // the conditions must be computable now (Tanaka, CIPM-2007 ranges): a dry run with the nominal as readings
  const conditions = {
    waterTemperatureC: input.conditions.waterTemperatureC,
    waterAirSaturated: input.conditions.waterAirSaturated ?? false,
    air: input.conditions.air,
    ...(input.conditions.evaporation ? { evaporation: input.conditions.evaporation } : {}),
  };
  try {
    calcFor(plan, conditions, balance.toJSON() as Balance, 0, [{ value: '1', unit: 'g' }, { value: '1', unit: 'g' }]);
  } catch (e) {
    if (e instanceof CalcError) throw AppError.validation(e.message, { [`conditions.${(e.field ?? 'waterTemperatureC').replace(/^conditions\./, '')}`]: e.message });
    throw e;
  }
  const at = now.toISOString();
  const id = await writeTransaction(async (transaction) => {
    const identifier = await nextIdentifier(today.slice(0, 4), transaction);
    const c = await VolumeCheck.create(
      {
        identifier,
        wareId: ware.id,
        wareSnapshot: ware.toJSON() as Record<string, unknown>,
        balanceId: balance.id,
        balanceSnapshot: balance.toJSON() as Record<string, unknown>,
        plan,
        gates,
        conditions,
        result: null,
        calcVersion: null,
        status: 'planned',
        notes: input.notes ?? null,
        nextDueOn: null,
        createdBy: actor.id,
        createdByName: actor.fullName,
        createdAt: at,
        updatedAt: at,
      },
      { transaction },
    );
    await recordAudit(
      { actor, action: 'plan', entity: 'volume_check', entityId: c.id, changes: [{ field: 'identifier', oldValue: null, newValue: identifier }, { field: 'ware', oldValue: null, newValue: ware.identifier }, { field: 'balance', oldValue: null, newValue: balance.identifier }, { field: 'plan', oldValue: null, newValue: plan }, { field: 'conditions', oldValue: null, newValue: conditions }] },
      transaction,
    );
    return c.id;
  });
  return getVolumeCheck(String(id), actor.id);
}

// ------------------------------------------------------------------ result

function calcFor(plan: VolumeCheckPlan, conditions: VolumeCheck['conditions'], balance: Balance, index: number, readings: Array<{ value: string; unit: string }>): VolumeCheckResponse {
  const t = plan.tested[index]!;
  return calculateVolumeCheck({
    ware: { kind: plan.kind, nominal: plan.nominal, class: plan.class, material: plan.material, mode: plan.mode, ...(plan.kind === 'piston_pipette' ? { testedVolume: { value: t.value, unit: t.unit } } : {}), ...(plan.limits ? { limits: plan.limits } : {}) },
    readings,
    waterTemperatureC: conditions.waterTemperatureC,
    waterAirSaturated: conditions.waterAirSaturated,
    air: conditions.air,
    balance: {
      weightDensity: { value: balance.weightDensity ?? '8.0', unit: 'g/mL' },
      readability: { value: balance.readabilityMg, unit: 'mg' },
      ...(balance.calibrationUncertaintyMg && balance.calibrationUncertaintyK ? { standardUncertainty: { value: new D(balance.calibrationUncertaintyMg).div(balance.calibrationUncertaintyK).toFixed(), unit: 'mg' } } : {}),
    },
    ...(conditions.evaporation ? { evaporation: conditions.evaporation } : {}),
  });
}

/** Readings still in force (not superseded), oldest first. */
export function currentReadings(rows: VolumeCheckReading[]): VolumeCheckReading[] {
  const superseded = new Set(rows.map((r) => r.supersedesId).filter((x): x is number => x !== null));
  return rows.filter((r) => !superseded.has(r.id));
}

export interface StoredResult {
  verdict: 'pass' | 'fail';
  tested: VolumeCheckResponse[];
}

function resultOf(c: VolumeCheck, rows: VolumeCheckReading[]): StoredResult | null {
  const cur = currentReadings(rows);
  const tested: VolumeCheckResponse[] = [];
  for (let i = 0; i < c.plan.tested.length; i++) {
    const mine = cur.filter((r) => r.testedIndex === i).sort((a, b) => a.replicate - b.replicate);
    if (mine.length < c.plan.tested[i]!.replicates) return null;
    tested.push(calcFor(c.plan, c.conditions, c.balanceSnapshot as unknown as Balance, i, mine.map((r) => ({ value: r.value, unit: r.unit }))));
  }
  return { verdict: tested.every((t) => t.verdict.result === 'pass') ? 'pass' : 'fail', tested };
}

// ------------------------------------------------------------------ readings

async function findCheck(key: string, transaction?: Transaction): Promise<VolumeCheck> {
  let c: VolumeCheck | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) c = await VolumeCheck.findByPk(Number(key), { transaction });
  else if (/^VC-\d{4}-\d{4,}$/.test(key)) c = await VolumeCheck.findOne({ where: { identifier: key }, transaction });
  if (!c) throw AppError.notFound(`Volume check ${key}`);
  return c;
}

/** POST /api/volume-checks/:key/readings */
export async function recordReading(key: string, input: VolumeCheckReadingInput, actor: Actor, opts: WriteOptions = {}): Promise<VolumeCheckDetail> {
  const now = opts.now ?? new Date();
  const at = now.toISOString();
  const id = await writeTransaction(async (transaction) => {
    const c = await findCheck(key, transaction);
    if (c.status !== 'planned') throw new AppError('invalid_transition', 409, `${c.identifier} is signed ('${c.status}'); a returned check takes readings again`);
    const t = c.plan.tested[input.testedIndex];
    if (!t) throw AppError.validation('No such tested volume', { testedIndex: `Tested volume ${input.testedIndex + 1} is not in the plan (${c.plan.tested.length} planned)` });
    if (input.replicate < 1 || input.replicate > t.replicates) throw AppError.validation('No such replicate', { replicate: `Replicate is 1 to ${t.replicates}` });
    const rows = await VolumeCheckReading.findAll({ where: { checkId: c.id }, order: [['id', 'ASC']], transaction });
    const current = currentReadings(rows).find((r) => r.testedIndex === input.testedIndex && r.replicate === input.replicate);
    let supersedesId: number | null = null;
    if (current) {
      if (input.supersedesId !== current.id) {
        throw new AppError('conflict', 409, `Replicate ${input.replicate} already reads ${current.value} ${current.unit}; correct it with a reason`, { fields: { value: `Replicate ${input.replicate} is recorded (${current.value} ${current.unit}); send a correction naming it, with a reason` } });
      }
      if (!input.correctionReason) throw AppError.validation('Give the reason for the correction', { correctionReason: 'Give the reason for the correction' });
      supersedesId = current.id;
    } else if (input.supersedesId !== undefined) {
      throw AppError.validation('Nothing to correct', { supersedesId: 'This replicate has no reading to correct' });
    }
    const r = await VolumeCheckReading.create(
      { checkId: c.id, testedIndex: input.testedIndex, replicate: input.replicate, value: input.value, unit: input.unit, supersedesId, correctionReason: supersedesId ? input.correctionReason! : null, recordedBy: actor.id, recordedByName: actor.fullName, recordedAt: at },
      { transaction },
    );
    let result: StoredResult | null = null;
    try {
      result = resultOf(c, [...rows, r]);
    } catch (e) {
      if (e instanceof CalcError) throw AppError.validation(e.message, { value: e.message });
      throw e;
    }
    const before = c.result ? (c.result as StoredResult).verdict : null;
    c.result = result;
    c.calcVersion = result ? VOLUME_CHECK_CALC_VERSION : null;
    c.updatedAt = at;
    await c.save({ transaction });
    await recordAudit(
      {
        actor,
        action: supersedesId ? 'reading_superseded' : 'reading_recorded',
        entity: 'volume_check',
        entityId: c.id,
        changes: [
          { field: `reading.${input.testedIndex + 1}.${input.replicate}`, oldValue: current ? `${current.value} ${current.unit}` : null, newValue: `${input.value} ${input.unit}` },
          ...(result || before ? [{ field: 'verdict', oldValue: before, newValue: result?.verdict ?? null }] : []),
        ],
        reason: supersedesId ? input.correctionReason! : null,
      },
      transaction,
    );
    return c.id;
  });
  return getVolumeCheck(String(id), actor.id);
}

// ------------------------------------------------------------------ signing

function recordForHash(c: VolumeCheck, rows: VolumeCheckReading[]) {
  return {
    volumeCheckId: c.id,
    identifier: c.identifier,
    version: c.version,
    ware: c.wareSnapshot,
    balance: c.balanceSnapshot,
    plan: c.plan,
    gates: c.gates,
    conditions: c.conditions,
    notes: c.notes,
    readings: rows.map((r) => ({ id: r.id, testedIndex: r.testedIndex, replicate: r.replicate, value: r.value, unit: r.unit, supersedesId: r.supersedesId, correctionReason: r.correctionReason, recordedBy: r.recordedBy, recordedAt: r.recordedAt })),
    result: c.result,
    calcVersion: c.calcVersion,
  };
}

interface CheckState {
  c: VolumeCheck;
  rows: VolumeCheckReading[];
  sigs: VolumeCheckSignature[];
  hash: string;
  canonical: string;
}

async function stateOf(c: VolumeCheck, transaction?: Transaction): Promise<CheckState> {
  const [rows, sigs] = await Promise.all([
    VolumeCheckReading.findAll({ where: { checkId: c.id }, order: [['id', 'ASC']], transaction }),
    VolumeCheckSignature.findAll({ where: { checkId: c.id }, order: [['id', 'ASC']], transaction }),
  ]);
  const canonical = canonicalJson(recordForHash(c, rows));
  return { c, rows, sigs, canonical, hash: sha256(canonical) };
}

const sigValid = (s: VolumeCheckSignature, st: CheckState) => s.recordVersion === st.c.version && s.recordHash === st.hash;

/** Who may not verify or return the current version, with the reason (as for a preparation). */
function excluded(st: CheckState): Map<number, string> {
  const out = new Map<number, string>();
  const add = (id: number, why: string) => void (out.has(id) || out.set(id, why));
  for (const s of st.sigs) if (s.meaning === 'prepared' && sigValid(s, st)) add(s.signerId, 'you signed this version as prepared');
  add(st.c.createdBy, 'you planned this check');
  for (const r of st.rows) add(r.recordedBy, 'you recorded readings of this check');
  return out;
}

type Meaning = VolumeCheckSignatureInput['meaning'];
const NEXT: Record<Meaning, { from: VolumeCheck['status']; to: VolumeCheck['status'] }> = {
  prepared: { from: 'planned', to: 'prepared' },
  verified: { from: 'prepared', to: 'verified' },
  returned: { from: 'prepared', to: 'planned' },
};

function refusal(st: CheckState, meaning: Meaning, user: { id: number; role: string }): { status: number; code: string; message: string } | null {
  const id = st.c.identifier;
  if (user.role !== 'chemist') return { status: 403, code: 'forbidden', message: meaning === 'prepared' ? 'Only a chemist signs a check as prepared' : 'Only a chemist other than the preparer verifies or returns a check' };
  if (st.c.status !== NEXT[meaning].from) return { status: 409, code: 'invalid_transition', message: `${id} is '${st.c.status}'; "${meaning}" needs it '${NEXT[meaning].from}'` };
  if (meaning === 'prepared' && !st.c.result) return { status: 409, code: 'invalid_transition', message: `${id}: record every replicate first` };
  if (meaning !== 'prepared') {
    const why = excluded(st).get(user.id);
    if (why) return { status: 403, code: 'self_verification', message: `You cannot ${meaning === 'verified' ? 'verify' : 'return'} ${id}: ${why}. A second chemist must review it.` };
  }
  return null;
}

function addMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number) as [number, number, number];
  const total = y * 12 + (m - 1) + months;
  const ny = Math.floor(total / 12);
  const nm = (total % 12) + 1;
  const last = new Date(Date.UTC(ny, nm, 0)).getUTCDate();
  return `${ny}-${String(nm).padStart(2, '0')}-${String(Math.min(d, last)).padStart(2, '0')}`;
}

export interface SignOpts extends WriteOptions {
  lockoutThreshold: number;
}

/** POST /api/volume-checks/:key/signatures */
export async function signVolumeCheck(key: string, input: VolumeCheckSignatureInput, signer: Actor, opts: SignOpts): Promise<VolumeCheckDetail> {
  const now = opts.now ?? new Date();
  const c = await findCheck(key);
  const user = await User.findByPk(signer.id);
  if (!user || !user.active) throw new AppError('unauthenticated', 401, 'Sign in to continue');
  const st = await stateOf(c);
  const refused = refusal(st, input.meaning, { id: user.id, role: user.role });
  if (refused) {
    if (refused.code === 'self_verification') {
      await writeTransaction((transaction) => recordAudit({ actor: signer, action: 'signature_refused', entity: 'volume_check', entityId: c.id, changes: [{ field: 'meaning', oldValue: null, newValue: input.meaning }], reason: refused.message }, transaction));
    }
    throw new AppError(refused.code, refused.status, refused.message);
  }
  if (input.meaning === 'verified') {
    const missing = VOLUME_CHECK_CHECKLIST.filter((x) => input.checklist?.[x.key] !== true);
    if (missing.length) throw AppError.validation(`Tick every checklist item before verifying (${missing.length} not ticked)`, Object.fromEntries(missing.map((x) => [`checklist.${x.key}`, `Tick: ${x.label}`])));
  }
  if (input.meaning === 'returned' && !input.reason) throw AppError.validation('Give the reason for returning the check', { reason: 'Give the reason for returning the check' });
  const acknowledged = await SignatureAcknowledgement.findByPk(user.id);
  if (!acknowledged && input.acknowledgeResponsibility !== true) {
    throw AppError.validation('Acknowledge the signature statement before your first signature', { acknowledgeResponsibility: SIGNATURE_RESPONSIBILITY_STATEMENT });
  }
  await checkSignerPassword(user, input.password, `"${input.meaning}" on ${c.identifier}`, c.id, opts.lockoutThreshold, 'volume_check');
  const at = now.toISOString();
  const settings = await getSettings();
  await writeTransaction(async (transaction) => {
    await c.reload({ transaction });
    const fresh = await stateOf(c, transaction);
    if (fresh.hash !== st.hash || c.status !== st.c.status) throw new AppError('conflict', 409, `${c.identifier} changed while you were signing; review it again`);
    if (!acknowledged) await SignatureAcknowledgement.create({ userId: user.id, statement: SIGNATURE_RESPONSIBILITY_STATEMENT, acknowledgedAt: at }, { transaction });
    await resetFailures(user, transaction);
    const s = await VolumeCheckSignature.create(
      { checkId: c.id, meaning: input.meaning, meaningText: SIGNATURE_MEANING_TEXT[input.meaning], signerId: user.id, signerName: user.fullName, signedAt: at, recordVersion: c.version, recordHash: fresh.hash, canonicalJson: fresh.canonical, reason: input.reason ?? null },
      { transaction },
    );
    const from = c.status;
    c.status = NEXT[input.meaning].to;
    const changes: Array<{ field: string; oldValue: unknown; newValue: unknown }> = [
      { field: 'status', oldValue: from, newValue: c.status },
      { field: 'signature.meaning', oldValue: null, newValue: input.meaning },
      { field: 'signature.recordVersion', oldValue: null, newValue: c.version },
      { field: 'signature.recordHash', oldValue: null, newValue: fresh.hash },
      { field: 'signature.id', oldValue: null, newValue: s.id },
    ];
    if (input.meaning === 'verified') {
      const due = addMonths(labDate(now, settings.timeZone), c.plan.intervalMonths);
      changes.push({ field: 'nextDueOn', oldValue: c.nextDueOn, newValue: due });
      c.nextDueOn = due;
    }
    if (input.meaning === 'returned') {
      changes.push({ field: 'version', oldValue: c.version, newValue: c.version + 1 });
      c.version = c.version + 1;
    }
    c.updatedAt = at;
    await c.save({ transaction });
    await recordAudit({ actor: { id: user.id, fullName: user.fullName }, action: 'sign', entity: 'volume_check', entityId: c.id, changes, reason: input.reason ?? null }, transaction);
  });
  return getVolumeCheck(String(c.id), user.id);
}

// ------------------------------------------------------------------ reading back

export interface VolumeCheckDetail {
  id: number;
  identifier: string;
  status: VolumeCheck['status'];
  version: number;
  ware: { id: number; identifier: string; kind: string; nominalVolumeMl: string; class: string; material: string | null };
  balance: { id: number; identifier: string; readabilityMg: string; description: string };
  plan: VolumeCheckPlan;
  gates: VolumeCheck['gates'];
  conditions: VolumeCheck['conditions'];
  notes: string | null;
  readings: Array<{ id: number; testedIndex: number; replicate: number; value: string; unit: string; supersedesId: number | null; correctionReason: string | null; recordedBy: { id: number; fullName: string }; recordedAt: string; current: boolean }>;
  result: StoredResult | null;
  calcVersion: string | null;
  nextDueOn: string | null;
  createdBy: { id: number; fullName: string };
  createdAt: string;
  signatures: Array<{ id: number; meaning: string; meaningText: string; signer: { id: number; fullName: string }; signedAt: string; recordVersion: number; recordHash: string; reason: string | null; valid: boolean }>;
  verificationChecklist: ReadonlyArray<{ key: string; label: string }>;
  canSign: { prepare: boolean; verify: boolean; return: boolean; reasons: Record<string, string>; acknowledgementRequired?: boolean };
}

export async function getVolumeCheck(key: string, viewerId?: number): Promise<VolumeCheckDetail> {
  const c = await findCheck(key);
  const st = await stateOf(c);
  const [viewer, ack] = await Promise.all([viewerId ? User.findByPk(viewerId) : null, viewerId ? SignatureAcknowledgement.findByPk(viewerId) : null]);
  const canSign: VolumeCheckDetail['canSign'] = { prepare: false, verify: false, return: false, reasons: {} };
  for (const [action, meaning] of [['prepare', 'prepared'], ['verify', 'verified'], ['return', 'returned']] as const) {
    const why = viewer ? refusal(st, meaning, { id: viewer.id, role: viewer.role }) : { message: 'Sign in to sign' };
    if (why) canSign.reasons[action] = why.message;
    else canSign[action] = true;
  }
  if (viewer) canSign.acknowledgementRequired = !ack;
  const current = new Set(currentReadings(st.rows).map((r) => r.id));
  const w = c.wareSnapshot as Record<string, string>;
  const b = c.balanceSnapshot as Record<string, string>;
  return {
    id: c.id,
    identifier: c.identifier,
    status: c.status,
    version: c.version,
    ware: { id: c.wareId, identifier: w.identifier!, kind: w.kind!, nominalVolumeMl: w.nominalVolumeMl!, class: w.wareClass ?? (w as Record<string, string>).class ?? 'n/a', material: w.material ?? null },
    balance: { id: c.balanceId, identifier: b.identifier!, readabilityMg: b.readabilityMg!, description: b.description! },
    plan: c.plan,
    gates: c.gates,
    conditions: c.conditions,
    notes: c.notes,
    readings: st.rows.map((r) => ({ id: r.id, testedIndex: r.testedIndex, replicate: r.replicate, value: r.value, unit: r.unit, supersedesId: r.supersedesId, correctionReason: r.correctionReason, recordedBy: { id: r.recordedBy, fullName: r.recordedByName }, recordedAt: r.recordedAt, current: current.has(r.id) })),
    result: c.result as StoredResult | null,
    calcVersion: c.calcVersion,
    nextDueOn: c.nextDueOn,
    createdBy: { id: c.createdBy, fullName: c.createdByName },
    createdAt: c.createdAt,
    signatures: st.sigs.map((s) => ({ id: s.id, meaning: s.meaning, meaningText: s.meaningText, signer: { id: s.signerId, fullName: s.signerName }, signedAt: s.signedAt, recordVersion: s.recordVersion, recordHash: s.recordHash, reason: s.reason, valid: sigValid(s, st) })),
    verificationChecklist: VOLUME_CHECK_CHECKLIST,
    canSign,
  };
}

export interface VolumeCheckSummary {
  id: number;
  identifier: string;
  ware: string;
  wareId: number;
  balance: string;
  status: VolumeCheck['status'];
  verdict: 'pass' | 'fail' | null;
  nextDueOn: string | null;
  createdAt: string;
}

/** GET /api/volume-checks?wareId= : newest first. */
export async function listVolumeChecks(filter: { wareId?: number }): Promise<VolumeCheckSummary[]> {
  const rows = await VolumeCheck.findAll({ where: filter.wareId ? { wareId: filter.wareId } : {}, order: [['id', 'DESC']], limit: 500 });
  return rows.map((c) => ({
    id: c.id,
    identifier: c.identifier,
    ware: String((c.wareSnapshot as Record<string, unknown>).identifier),
    wareId: c.wareId,
    balance: String((c.balanceSnapshot as Record<string, unknown>).identifier),
    status: c.status,
    verdict: c.result ? (c.result as StoredResult).verdict : null,
    nextDueOn: c.nextDueOn,
    createdAt: c.createdAt,
  }));
}

// ------------------------------------------------------------------ the ware's calibration status

export interface WareCalibration {
  wareId: number;
  status: 'calibrated' | 'failed' | 'overdue' | 'not_checked';
  check: { identifier: string; verdict: 'pass' | 'fail'; verifiedOn: string; nextDueOn: string | null } | null;
  /** the mean volume and its expanded uncertainty at the first tested volume (nominal), from the check */
  calibratedVolume: { value: string; unit: string; expandedUncertainty: string; k: string } | null;
}

/** GET /api/volumetric-ware/:id/calibration: from the latest verified check. */
export async function wareCalibration(wareId: number, now = new Date(), transaction?: Transaction): Promise<WareCalibration> {
  if (!(await VolumetricWare.findByPk(wareId, { transaction }))) throw AppError.notFound(`Volumetric ware ${wareId}`);
  const latest = await VolumeCheck.findOne({ where: { wareId, status: 'verified' }, order: [['id', 'DESC']], transaction });
  if (!latest || !latest.result) return { wareId, status: 'not_checked', check: null, calibratedVolume: null };
  const r = latest.result as StoredResult;
  const settings = await getSettings(transaction);
  const today = labDate(now, settings.timeZone);
  const status = r.verdict === 'fail' ? 'failed' : latest.nextDueOn && latest.nextDueOn < today ? 'overdue' : 'calibrated';
  const first = r.tested[0]!;
  return {
    wareId,
    status,
    check: { identifier: latest.identifier, verdict: r.verdict, verifiedOn: latest.updatedAt.slice(0, 10), nextDueOn: latest.nextDueOn },
    calibratedVolume: { value: first.mean.value, unit: first.mean.unit, expandedUncertainty: first.uncertainty.expandedUncertainty, k: first.uncertainty.k },
  };
}



/** GET /api/volume-checks/:key/certificate.pdf: the calibration certificate as the record is now; recorded as a print. */
export async function volumeCheckCertificatePdf(key: string, actor: Actor): Promise<{ pdf: Buffer; filename: string }> {
  const [check, settings] = await Promise.all([getVolumeCheck(key), getSettings()]);
  const generatedAt = new Date().toISOString();
  const pdf = await renderVolumeCheckCertificate({ lab: { name: settings.labName, timeZone: settings.timeZone }, check, generatedAt, generatedBy: actor.fullName });
  await writeTransaction((transaction) =>
    recordAudit(
      { actor, action: 'print', entity: 'volume_check', entityId: check.id, changes: [{ field: 'kind', oldValue: null, newValue: 'calibration_certificate' }, { field: 'identifier', oldValue: null, newValue: `${check.identifier} v${check.version} ${check.status}` }] },
      transaction,
    ),
  );
  return { pdf, filename: `${check.identifier}-certificate.pdf` };
}
