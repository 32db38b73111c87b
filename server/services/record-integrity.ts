/**
 * Seal check of signed records (21 CFR 11.10(a), 11.70; REQUIREMENTS ES-03): a signed record whose stored data no
 * longer match what was signed is shown everywhere as "seal_broken" (our name; never "verified"), with the stored
 * status kept as sealBroken.storedStatus and the problems found. The first time a break is seen for a version it is
 * audited ("seal_broken", entity preparation) and QA is e-mailed; later reads find that entry and say so again.
 *
 * A record is sealed while its stored status is prepared, returned, verified or discarded. Then:
 * - the latest signature names the current version with the meaning of the stored status (a status set by hand,
 *   without a signature, is a break);
 * - the stored version it signed (record_versions) hashes to its recordHash, and every preparation column in it
 *   equals the row as read now: identifier, version, inputs, notes, conditions, snapshots, plan, gates, result,
 *   expiry as signed and, from canonical version 2, the shown columns (signatures.service.ts shownColumns:
 *   analyte_formula, target_value, target_unit, volume_value, volume_unit, material_id, balance_id, flask_id, kind,
 *   created_on, created_by, created_at, concentration_display, dilution_result). For a version-1 signature the
 *   shown columns that can be derived from the signed data are compared with it: concentration_display (the
 *   signed result's display), analyte_formula, target and entered volume (the signed inputs);
 * - after a QA expiry extension, expires_on is the one the latest expiry_extensions row of that version set;
 * - full check only (record, prep sheet, label print, trace of the record, the daily sweep): the record as it is
 *   now, with every weighing, make-up, aliquot and reading, hashes to the signature (the canonical version it was
 *   signed in), and every signature's hash is the one the keyed audit trail recorded when it was signed, so a
 *   signature rewritten with a recomputed hash is found too.
 * The list and the trace graph run the row check from one batch of reads (signatures, the signed versions and,
 * when any, the extensions and earlier findings of the page's records), not the full check.
 */
import { createHash } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { AuditEntry, ExpiryExtension, Preparation, RecordVersion, Signature, User } from '../db/models/index.ts';
import { canonicalJson, writeTransaction } from '../db/transaction.ts';
import { enqueueMail, type QueuedMail } from '../mail/mailer.ts';
import { recordAudit } from './audit.service.ts';

export const SEAL_BROKEN = 'seal_broken';
export const SEAL_BROKEN_ACTION = 'seal_broken';
/** Stored statuses in which the record's data are closed by a signature. */
export const SEALED_STATUSES: readonly string[] = ['prepared', 'returned', 'verified', 'discarded'];

export interface SealBroken {
  /** the stored status the record would show */
  storedStatus: string;
  problems: string[];
}

/** What the check compares; `current` and `audited` only for the full check. */
export interface SealInput {
  p: Preparation;
  /** every signature of the record, oldest first */
  sigs: Signature[];
  /** the stored signed version the latest signature names (null when none was found) */
  signed: RecordVersion | null;
  /** the latest expiry extension of the current version (when the record was extended at this version) */
  extension?: ExpiryExtension | null;
  /** the record as it is now: its hash under canonical version 2, and under version 1 on demand */
  current?: { hash: string; hashV1: () => string; hashV2?: () => string };
  /** signature id -> recordHash as the audit trail recorded it at signing */
  audited?: Map<number, string>;
}

const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');
const same = (a: unknown, b: unknown) => canonicalJson(a ?? null) === canonicalJson(b ?? null);
const isSealed = (p: Preparation) => SEALED_STATUSES.includes(p.status);

/** The record's own fields as recordForHash writes them (no entries), to compare with the signed version. */
function rowFields(p: Preparation): Record<string, unknown> {
  const signedExpiry =
    p.preExtensionVersion != null && p.preExtensionVersion === p.version && p.preExtensionExpiresOn && p.preExtensionExpiryReason
      ? { expiresOn: p.preExtensionExpiresOn, expiryReason: p.preExtensionExpiryReason }
      : { expiresOn: p.expiresOn, expiryReason: p.expiryReason };
  return {
    preparationId: p.id,
    identifier: p.identifier,
    version: p.version,
    inputs: p.inputs,
    notes: p.notes,
    conditionsUsed: p.conditionsUsed,
    snapshot: { material: p.snapshotMaterial, balance: p.snapshotBalance, flask: p.snapshotFlask },
    plan: p.plan,
    gates: p.gates,
    result: p.result,
    ...signedExpiry,
  };
}

/** Columns of the shown block, as the problem text names them. */
const SHOWN_NAMES: Record<string, string> = {
  analyteFormula: 'analyte_formula',
  target: 'target_value/target_unit',
  volume: 'volume_value/volume_unit',
  materialId: 'material_id',
  balanceId: 'balance_id',
  flaskId: 'flask_id',
  kind: 'kind',
  createdOn: 'created_on',
  createdBy: 'created_by',
  createdAt: 'created_at',
  concentrationDisplay: 'concentration_display',
  dilutionResult: 'dilution_result',
};

/** The problems found (empty when the seal holds or the record is not sealed). Pure. */
export function sealProblems(x: SealInput, shown: (p: Preparation) => Record<string, unknown>): string[] {
  const { p, sigs } = x;
  if (!isSealed(p)) return [];
  const last = sigs.at(-1);
  if (!last || last.recordVersion !== p.version || last.meaning !== p.status) {
    return [`the stored state '${p.status}' at version ${p.version} is not the latest signature's${last ? ` ("${last.meaning}" on version ${last.recordVersion})` : ' (no signature)'}`];
  }
  const out: string[] = [];
  if (!x.signed) out.push(`the signed content of version ${p.version} is missing`);
  else if (sha256(x.signed.canonicalJson) !== last.recordHash) out.push(`the stored signed content of version ${p.version} does not hash to the signature`);
  else {
    let signed: Record<string, unknown> = {};
    try {
      signed = JSON.parse(x.signed.canonicalJson) as Record<string, unknown>;
    } catch {
      out.push('the stored signed content is not readable');
    }
    const row = rowFields(p);
    for (const [k, v] of Object.entries(row)) if (!same(v, signed[k])) out.push(`${k} differs from what was signed`);
    if (typeof signed.canonicalVersion === 'number' && signed.canonicalVersion >= 2) {
      const now = shown(p);
      const then = (signed.shown ?? {}) as Record<string, unknown>;
      for (const [k, v] of Object.entries(now)) if (!same(v, then[k])) out.push(`${SHOWN_NAMES[k] ?? k} differs from what was signed`);
    } else {
      // version 1: derive what can be derived from the signed data
      const result = signed.result as { concentration?: { display?: string } } | null | undefined;
      const dilution = signed.dilutionResult as { display?: string } | null | undefined;
      const display = result?.concentration?.display ?? (signed.mixResults ? undefined : dilution?.display);
      if (display !== undefined && (p.concentrationDisplay ?? null) !== display) out.push('concentration_display differs from the signed result');
      const inputs = (signed.inputs ?? {}) as { analyteFormula?: string; target?: unknown; volume?: unknown };
      if (inputs.analyteFormula !== undefined && inputs.analyteFormula !== p.analyteFormula) out.push('analyte_formula differs from the signed inputs');
      if (inputs.target !== undefined && !same(inputs.target, { value: p.targetValue, unit: p.targetUnit })) out.push('target_value/target_unit differ from the signed inputs');
      if (inputs.volume !== undefined && !same(inputs.volume, { value: p.volumeValue, unit: p.volumeUnit })) out.push('volume_value/volume_unit differ from the signed inputs');
    }
  }
  if (p.preExtensionVersion != null && p.preExtensionVersion === p.version) {
    if (!x.extension) out.push('the expiry was extended without an expiry extension record');
    else if (x.extension.newExpiresOn !== p.expiresOn) out.push(`expires_on ${p.expiresOn} is not the extended expiry ${x.extension.newExpiresOn}`);
  }
  if (x.current) {
    for (const s of sigs) {
      if (s.recordVersion !== p.version || s.meaning === 'amended') continue;
      if (s.recordHash !== x.current.hash && s.recordHash !== x.current.hashV2?.() && s.recordHash !== x.current.hashV1()) {
        out.push(`the record's data (weighings, make-up, aliquots, readings or result) no longer match the "${s.meaning}" signature`);
        break;
      }
    }
  }
  if (x.audited) {
    for (const s of sigs) {
      const recorded = x.audited.get(s.id);
      if (recorded !== s.recordHash) out.push(`signature #${s.id} ("${s.meaning}") ${recorded ? 'does not match' : 'is not in'} the audit trail`);
    }
  }
  return out;
}

// ------------------------------------------------------------------ batched reads

interface Loaded {
  sigs: Map<number, Signature[]>;
  versions: Map<string, RecordVersion>;
  extensions: Map<number, ExpiryExtension>;
}

async function loadFor(ps: Preparation[], transaction?: Transaction): Promise<Loaded> {
  const sealed = ps.filter(isSealed);
  const out: Loaded = { sigs: new Map(), versions: new Map(), extensions: new Map() };
  if (!sealed.length) return out;
  const ids = sealed.map((p) => p.id);
  for (const s of await Signature.findAll({ where: { preparationId: ids }, order: [['id', 'ASC']], transaction })) out.sigs.set(s.preparationId, [...(out.sigs.get(s.preparationId) ?? []), s]);
  const lastHashes = sealed.map((p) => out.sigs.get(p.id)?.at(-1)?.recordHash).filter((h): h is string => Boolean(h));
  if (lastHashes.length) {
    for (const rv of await RecordVersion.findAll({ where: { preparationId: ids, recordHash: lastHashes }, transaction })) out.versions.set(`${rv.preparationId}:${rv.version}:${rv.recordHash}`, rv);
  }
  const extended = sealed.filter((p) => p.preExtensionVersion != null && p.preExtensionVersion === p.version).map((p) => p.id);
  if (extended.length) {
    for (const e of await ExpiryExtension.findAll({ where: { preparationId: extended }, order: [['id', 'ASC']], transaction })) {
      const p = sealed.find((x) => x.id === e.preparationId);
      if (p && e.recordVersion === p.version) out.extensions.set(e.preparationId, e);
    }
  }
  return out;
}

function inputOf(p: Preparation, l: Loaded): SealInput {
  const sigs = l.sigs.get(p.id) ?? [];
  const last = sigs.at(-1);
  return { p, sigs, signed: last ? (l.versions.get(`${p.id}:${last.recordVersion}:${last.recordHash}`) ?? null) : null, extension: l.extensions.get(p.id) ?? null };
}

/** Earlier findings (audit entries) of these records at their current version: preparation id -> the reason recorded. */
async function findingsOf(ps: Preparation[], transaction?: Transaction): Promise<Map<number, string>> {
  const sealed = ps.filter(isSealed);
  const out = new Map<number, string>();
  if (!sealed.length) return out;
  const rows = await AuditEntry.findAll({ where: { action: SEAL_BROKEN_ACTION, entity: 'preparation', entityId: { [Op.in]: sealed.map((p) => String(p.id)) } }, order: [['id', 'ASC']], transaction });
  for (const r of rows) {
    const p = sealed.find((x) => String(x.id) === r.entityId);
    let version: unknown;
    try {
      version = (JSON.parse(r.changes) as Array<{ field: string; newValue: unknown }>).find((c) => c.field === 'recordVersion')?.newValue;
    } catch {
      version = undefined;
    }
    if (p && version === p.version) out.set(p.id, r.reason ?? 'the seal was found broken');
  }
  return out;
}

/**
 * The first time a break is seen at this version: an audit entry ("seal_broken") and an e-mail to every active QA
 * account, in one transaction (checked again inside it, so two readers record it once).
 */
export async function reportSealBroken(p: Preparation, problems: string[], now = new Date()): Promise<void> {
  await writeTransaction(async (transaction) => {
    if ((await findingsOf([p], transaction)).has(p.id)) return;
    await recordAudit(
      {
        actor: null,
        action: SEAL_BROKEN_ACTION,
        entity: 'preparation',
        entityId: p.id,
        changes: [
          { field: 'recordVersion', oldValue: null, newValue: p.version },
          { field: 'status', oldValue: p.status, newValue: SEAL_BROKEN },
        ],
        reason: problems.join('; '),
      },
      transaction,
    );
    const qa = await User.findAll({ where: { role: 'qa', active: true }, order: [['id', 'ASC']], transaction });
    const subject = `Seal broken: ${p.identifier} no longer matches its signatures`;
    const text = [
      `${p.identifier} (version ${p.version}, stored state '${p.status}') no longer matches what was signed:`,
      '',
      ...problems.map((x) => `- ${x}`),
      '',
      'Tarebook shows it as "seal broken" everywhere and refuses its labels. Investigate the change (the audit trail and the database) before the standard is used again.',
    ].join('\n');
    const html = `<!doctype html><html><body style="font-family: sans-serif"><p>${escapeHtml(text.split('\n')[0]!)}</p><ul>${problems.map((x) => `<li>${escapeHtml(x)}</li>`).join('')}</ul><p>${escapeHtml(text.split('\n').at(-1)!)}</p></body></html>`;
    const mails: QueuedMail[] = qa.map((u) => ({ kind: SEAL_BROKEN_ACTION, to: u.email, preparationId: p.id, subject, text, html }));
    await enqueueMail(mails, transaction, now);
  });
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

/**
 * Row check of several records at once (the list, the trace): preparation id -> SealBroken for each broken one,
 * including a break found earlier by a full check at the current version. New breaks are reported.
 */
export async function sealStates(ps: Preparation[], shown: (p: Preparation) => Record<string, unknown>): Promise<Map<number, SealBroken>> {
  const out = new Map<number, SealBroken>();
  if (!ps.some(isSealed)) return out;
  const [loaded, earlier] = await Promise.all([loadFor(ps), findingsOf(ps)]);
  for (const p of ps) {
    if (!isSealed(p)) continue;
    const problems = sealProblems(inputOf(p, loaded), shown);
    if (problems.length && !earlier.has(p.id)) await reportSealBroken(p, problems);
    const found = earlier.get(p.id);
    if (found && !problems.length) problems.push(found);
    if (problems.length) out.set(p.id, { storedStatus: p.status, problems });
  }
  return out;
}

/** Full check of one record with its entries already loaded (signatures.service passes the current hashes). */
export async function fullSealCheck(p: Preparation, sigs: Signature[], current: { hash: string; hashV1: () => string; hashV2?: () => string }, shown: (p: Preparation) => Record<string, unknown>): Promise<SealBroken | null> {
  if (!isSealed(p)) return null;
  const [loaded, earlier, audits] = await Promise.all([
    loadFor([p]),
    findingsOf([p]),
    AuditEntry.findAll({ where: { action: 'sign', entity: 'preparation', entityId: String(p.id) }, order: [['id', 'ASC']] }),
  ]);
  const audited = new Map<number, string>();
  for (const a of audits) {
    try {
      const changes = JSON.parse(a.changes) as Array<{ field: string; newValue: unknown }>;
      const id = changes.find((c) => c.field === 'signature.id')?.newValue;
      const hash = changes.find((c) => c.field === 'signature.recordHash')?.newValue;
      if (typeof id === 'number' && typeof hash === 'string') audited.set(id, hash);
    } catch {
      /* an unreadable entry records nothing */
    }
  }
  const problems = sealProblems({ ...inputOf(p, loaded), sigs, current, audited }, shown);
  if (problems.length && !earlier.has(p.id)) await reportSealBroken(p, problems);
  const found = earlier.get(p.id);
  if (found && !problems.length) problems.push(found);
  return problems.length ? { storedStatus: p.status, problems } : null;
}

/** Puts the seal state on a summary, detail or trace node: status "seal_broken" and the stored status kept. */
export function showSealBroken<T extends { status: string; sealBroken?: SealBroken }>(target: T, broken: SealBroken | null | undefined): T {
  if (!broken) return target;
  target.status = SEAL_BROKEN;
  target.sealBroken = broken;
  return target;
}
