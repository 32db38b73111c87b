/**
 * Expiry on read and QA expiry extensions (REQUIREMENTS EX-01, EX-04, EX-05; ES-02, ES-03, ES-04, ES-08; PW-03).
 *
 * Expired on read: a live record (planned, prepared, returned, verified) whose expiresOn is before the lab date
 * is shown as 'expired', with its stored status kept as statusBeforeExpiry (shared/schemas/expiry.ts
 * shownStatus), and the list filter follows the shown status. The stored status does not change: nothing
 * persists 'expired', so the state machine, the signatures and their hashes are untouched and an extension
 * makes the record usable again simply by moving expiresOn. Parent use and label prints already refuse a
 * record past expiresOn (lineage.service usableParent, printing.service).
 *
 * Extension (POST /api/preparations/:key/expiry-extensions, QA only): a new date later than the current
 * expiry, not already past, never later than the cap (every parent's current expiry and the reference
 * material lot's expiry, EX-01; 422 naming the limiting record), a reason (the documented evaluation), and
 * the QA user's password re-entered (the signature service's check: 401 counted towards the lockout, 423 when
 * locked). A discarded record, a record already stored as expired, or one not yet made up cannot be extended
 * (409). In one write transaction: an append-only expiry_extensions row (record version and the SHA-256 of
 * the canonical record at signing, meaning text, signer), preparations.expires_on and expiry_reason
 * ("extended by QA <name> on <date>: <reason>"), the pre-extension expiry kept for the hash (see
 * server/db/models/expiry-extension.ts expiryAsSigned) and the audit entry 'expiry_extended'.
 * The record version does not change, so the prepared/verified signatures stay valid.
 */
import { Op, type Transaction, type WhereOptions } from 'sequelize';
import { parsePreparationId } from '../../shared/prep/index.ts';
import {
  EXPIRY_EXTENSION_MEANING_TEXT,
  LIVE_STATUSES,
  expiryCapOf,
  extensionDateProblem,
  extensionReasonText,
  isLiveStatus,
  type ExpiryCap,
  type ExpiryExtensionDto,
  type ExpiryExtensionInput,
  type ExpiryLimitInput,
  type ExpirySection,
} from '../../shared/schemas/expiry.ts';
import { SIGNATURE_RESPONSIBILITY_STATEMENT } from '../../shared/schemas/preparations.ts';
import { ExpiryExtension, MakeUp, Preparation, PreparationParent, ReferenceMaterial, SignatureAcknowledgement, User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { recordAudit } from './audit.service.ts';
import { getSettings } from './settings.service.ts';
import { checkSignerPassword, currentRecordHash, resetFailures, storeVersion } from './signatures.service.ts';
import { labDate } from '../../shared/prep/lab-time.ts';

export interface ExtendOptions {
  lockoutThreshold: number;
  /** tests and the seed; routes use the server clock */
  now?: Date;
}

/** The lab's calendar date of an instant (YYYY-MM-DD in the settings time zone; as preparations.service labDate). */
export function labDateOf(at: Date, timeZone: string): string {
  return labDate(at, timeZone); // shared/prep/lab-time.ts
}

/** Today in the lab's time zone. */
export async function labToday(now = new Date(), transaction?: Transaction): Promise<string> {
  return labDateOf(now, (await getSettings(transaction)).timeZone);
}

/**
 * The where clause of GET /api/preparations?status=…, by the shown status: 'expired' finds stored-expired
 * records and live ones past their expiry; a live status finds only records still in date.
 */
export function statusWhere(status: string, today: string): WhereOptions {
  if (status === 'expired') {
    return { [Op.or]: [{ status: 'expired' }, { status: { [Op.in]: [...LIVE_STATUSES] }, expiresOn: { [Op.lt]: today } }] } as WhereOptions;
  }
  if (isLiveStatus(status)) return { status, expiresOn: { [Op.gte]: today } } as WhereOptions;
  return { status };
}

// ------------------------------------------------------------------ the cap (EX-01)

async function findByKey(key: string): Promise<Preparation> {
  let p: Preparation | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) p = await Preparation.findByPk(Number(key));
  else if (parsePreparationId(key)) p = await Preparation.findOne({ where: { identifier: key } });
  if (!p) throw AppError.notFound(`Preparation ${key}`);
  return p;
}

/**
 * Every input that caps an extension: each parent at its current expiry (its expiry at use when the parent
 * row is gone), then the reference material lot at its current expiry (the snapshot's when the lot is gone).
 */
export async function expiryLimitsOf(p: Preparation, transaction?: Transaction): Promise<ExpiryLimitInput[]> {
  const t = transaction ? { transaction } : {};
  const links = await PreparationParent.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']], ...t });
  const parents = links.length ? await Preparation.findAll({ where: { id: links.map((l) => l.parentPreparationId) }, ...t }) : [];
  const byId = new Map(parents.map((x) => [x.id, x]));
  const out: ExpiryLimitInput[] = links.map((l) => {
    const row = byId.get(l.parentPreparationId);
    return { kind: 'parent', label: `parent ${row?.identifier ?? l.snapshot.identifier}`, expiresOn: row?.expiresOn ?? l.snapshot.expiresOn ?? null };
  });
  const m = await ReferenceMaterial.findByPk(p.materialId, t);
  const snap = p.snapshotMaterial;
  const name = m?.name ?? snap.name;
  const lot = m?.lot ?? snap.lot;
  out.push({ kind: 'material', label: `reference material ${name} lot ${lot}`, expiresOn: (m ? m.expiresOn : snap.expiresOn) ?? null });
  return out;
}

export async function expiryCapFor(p: Preparation, transaction?: Transaction): Promise<ExpiryCap | null> {
  return expiryCapOf(await expiryLimitsOf(p, transaction));
}

/** Why the record cannot be extended at all (state), or null. */
async function stateProblem(p: Preparation, transaction?: Transaction): Promise<string | null> {
  if (p.status === 'discarded') return `${p.identifier} is discarded: a discarded record cannot be extended`;
  if (!isLiveStatus(p.status)) return `${p.identifier} is '${p.status}' and cannot be extended`;
  const madeUp = await MakeUp.count({ where: { preparationId: p.id }, ...(transaction ? { transaction } : {}) });
  if (!madeUp) return `${p.identifier} has not been made up yet: its expiry is set when the solution is made up`;
  return null;
}

// ------------------------------------------------------------------ the detail section

function extensionDto(e: ExpiryExtension): ExpiryExtensionDto {
  return {
    id: e.id,
    previousExpiresOn: e.previousExpiresOn,
    newExpiresOn: e.newExpiresOn,
    reason: e.reason,
    signedBy: { id: e.signedBy, fullName: e.signedByName },
    signedAt: e.signedAt,
    meaningText: e.meaningText,
    recordVersion: e.recordVersion,
    recordHash: e.recordHash,
    cap: e.capExpiresOn && e.capLimitedBy ? { date: e.capExpiresOn, limitedBy: e.capLimitedBy } : null,
  };
}

/** The expiry fields of GET /api/preparations/:key: the extensions, the cap now, and whether the viewer may extend. */
export async function expirySection(p: Preparation, viewerId?: number, today?: string): Promise<ExpirySection> {
  const [rows, cap, viewer, problem, lab] = await Promise.all([
    ExpiryExtension.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
    expiryCapFor(p),
    viewerId ? User.findByPk(viewerId) : Promise.resolve(null),
    stateProblem(p),
    today ? Promise.resolve(today) : labToday(),
  ]);
  let reason: string | undefined;
  if (!viewer || viewer.role !== 'qa') reason = 'Only QA can extend an expiry';
  else if (problem) reason = problem;
  else if (cap && cap.date <= p.expiresOn) reason = `The expiry cannot be extended: ${p.expiresOn} is already the latest date allowed (limited by ${cap.limitedBy}, which expires on ${cap.date})`;
  else if (cap && cap.date < lab) reason = `The expiry cannot be extended: ${cap.limitedBy} expired on ${cap.date}`;
  return { expiryExtensions: rows.map(extensionDto), expiryCap: cap, canExtendExpiry: reason ? { allowed: false, reason } : { allowed: true } };
}

// ------------------------------------------------------------------ extending

const field = (message: string) => new AppError('expiry_not_allowed', 422, message, { fields: { newExpiresOn: message } });

/** POST /api/preparations/:key/expiry-extensions. Returns the preparation id; the route sends the detail. */
export async function extendExpiry(key: string, input: ExpiryExtensionInput, signer: { id: number; fullName: string }, opts: ExtendOptions): Promise<number> {
  const now = opts.now ?? new Date();
  const p = await findByKey(key);
  const user = await User.findByPk(signer.id);
  if (!user || !user.active) throw new AppError('unauthenticated', 401, 'Sign in to continue');
  if (user.role !== 'qa') throw new AppError('forbidden', 403, 'Only QA can approve an expiry extension');
  const problem = await stateProblem(p);
  if (problem) throw AppError.conflict(problem);
  const today = await labToday(now);
  const cap = await expiryCapFor(p);
  const dateProblem = extensionDateProblem(input.newExpiresOn, p.expiresOn, cap, today);
  if (dateProblem) throw field(dateProblem);
  const acknowledged = await SignatureAcknowledgement.findByPk(user.id);
  if (!acknowledged && input.acknowledgeResponsibility !== true) {
    throw AppError.validation('Acknowledge the signature statement before your first signature', { acknowledgeResponsibility: SIGNATURE_RESPONSIBILITY_STATEMENT });
  }
  await checkSignerPassword(user, input.password, 'an expiry extension', p.id, opts.lockoutThreshold);

  const at = now.toISOString();
  const reason = input.reason.trim();
  await writeTransaction(async (transaction) => {
    const before = { status: p.status, version: p.version, expiresOn: p.expiresOn };
    await p.reload({ transaction });
    if (p.status !== before.status || p.version !== before.version || p.expiresOn !== before.expiresOn) {
      throw AppError.conflict(`${p.identifier} changed while you were signing (now version ${p.version}, expiry ${p.expiresOn}); review it again`);
    }
    const freshCap = await expiryCapFor(p, transaction);
    const again = extensionDateProblem(input.newExpiresOn, p.expiresOn, freshCap, today);
    if (again) throw field(again);
    // the canonical record the extension is signed against; the extension leaves it (and its hash) unchanged
    const signed = await currentRecordHash(p.id, transaction);
    await storeVersion(p, signed.canonical, signed.hash, at, transaction);
    if (!acknowledged) await SignatureAcknowledgement.create({ userId: user.id, statement: SIGNATURE_RESPONSIBILITY_STATEMENT, acknowledgedAt: at }, { transaction });
    await resetFailures(user, transaction);
    const previous = { expiresOn: p.expiresOn, expiryReason: p.expiryReason };
    if (p.preExtensionVersion !== p.version) {
      p.preExtensionVersion = p.version;
      p.preExtensionExpiresOn = p.expiresOn;
      p.preExtensionExpiryReason = p.expiryReason;
    }
    p.expiresOn = input.newExpiresOn;
    p.expiryReason = extensionReasonText(user.fullName, today, reason);
    p.updatedAt = at;
    await p.save({ transaction });
    const after = await currentRecordHash(p.id, transaction);
    if (after.hash !== signed.hash) throw new Error(`expiry extension of ${p.identifier} would change the signed record hash`);
    const row = await ExpiryExtension.create(
      {
        preparationId: p.id,
        recordVersion: p.version,
        recordHash: signed.hash,
        previousExpiresOn: previous.expiresOn,
        previousExpiryReason: previous.expiryReason,
        newExpiresOn: input.newExpiresOn,
        reason,
        capExpiresOn: freshCap?.date ?? null,
        capLimitedBy: freshCap?.limitedBy ?? null,
        signedBy: user.id,
        signedByName: user.fullName,
        signedAt: at,
        meaningText: EXPIRY_EXTENSION_MEANING_TEXT,
      },
      { transaction },
    );
    await recordAudit(
      {
        actor: { id: user.id, fullName: user.fullName },
        action: 'expiry_extended',
        entity: 'preparation',
        entityId: p.id,
        changes: [
          { field: 'expiresOn', oldValue: previous.expiresOn, newValue: p.expiresOn },
          { field: 'expiryReason', oldValue: previous.expiryReason, newValue: p.expiryReason },
          { field: 'expiryExtension.id', oldValue: null, newValue: row.id },
          { field: 'expiryExtension.meaning', oldValue: null, newValue: EXPIRY_EXTENSION_MEANING_TEXT },
          { field: 'expiryExtension.recordVersion', oldValue: null, newValue: p.version },
          { field: 'expiryExtension.recordHash', oldValue: null, newValue: signed.hash },
          { field: 'expiryExtension.cap', oldValue: null, newValue: freshCap ? `${freshCap.date} (${freshCap.limitedBy})` : null },
        ],
        reason,
      },
      transaction,
    );
  });
  return p.id;
}
