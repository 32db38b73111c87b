/**
 * The daily expiry digest (REQUIREMENTS EX-04 "notify the owner beforehand"): standards that expire within
 * the lab's notice period (settings.expiryNoticeDays, default 14) are grouped by preparer, and each preparer
 * gets one e-mail (text and HTML, a link to every record). Messages are queued in mail_queue in one write
 * transaction and delivered after commit by the mailer, like the verification e-mails.
 *
 * "Within the notice period" is by lab calendar date: expires on today .. today + noticeDays, both included.
 * Standards already expired, or discarded, are left out. Inactive preparers get no mail.
 */
import { Op, literal } from 'sequelize';
import { addDays, daysBetween } from '../../shared/prep/index.ts';
import { DEFAULT_EXPIRY_NOTICE_DAYS } from '../../shared/schemas/settings.ts';
import type { ExpiryDigestResult } from '../../shared/schemas/trace.ts';
import { Preparation, User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { enqueueMail, type Mailer, type QueuedMail } from '../mail/mailer.ts';
import { recordLink, type MailContent } from '../mail/templates.ts';
import { recordAudit } from './audit.service.ts';
import { labDate } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';

export const DIGEST_EXCLUDED_STATUSES = ['expired', 'discarded'] as const;

export interface DigestOptions {
  publicUrl: string;
  mailer?: Mailer;
  /** who ran it now (admin); null for the scheduled run */
  actor?: { id: number; fullName: string } | null;
}

export interface DigestItem {
  identifier: string;
  materialName: string;
  analyteFormula: string;
  concentrationDisplay: string | null;
  status: string;
  expiresOn: string;
  daysLeft: number;
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

const whenText = (d: number) => (d === 0 ? 'expires today' : d === 1 ? 'expires tomorrow' : `expires in ${d} days`);

/** The digest e-mail for one preparer. */
export function expiryDigestMail(fullName: string, items: DigestItem[], noticeDays: number, on: string, publicUrl: string, labName: string): MailContent {
  const subject = `Expiry digest: ${items.length} standard${items.length === 1 ? '' : 's'} expiring within ${noticeDays} days`;
  const line = (i: DigestItem) =>
    `${i.identifier} — ${i.analyteFormula} from ${i.materialName}${i.concentrationDisplay ? `, ${i.concentrationDisplay}` : ''} (${i.status}): ${whenText(i.daysLeft)}, on ${i.expiresOn}`;
  const text = [
    `Dear ${fullName},`,
    '',
    `These standards you prepared expire within ${noticeDays} days of ${on}:`,
    '',
    ...items.flatMap((i) => [`- ${line(i)}`, `  ${recordLink(publicUrl, i.identifier)}`]),
    '',
    'Prepare replacements in time, or discard what is no longer needed.',
    '',
    `— Tarebook, ${labName}`,
  ].join('\n');
  const html =
    '<!doctype html><html><body style="font-family: sans-serif; line-height: 1.4">' +
    `<p>Dear ${escapeHtml(fullName)},</p>` +
    `<p>These standards you prepared expire within ${noticeDays} days of ${escapeHtml(on)}:</p><ul>` +
    items.map((i) => `<li><a href="${escapeHtml(recordLink(publicUrl, i.identifier))}">${escapeHtml(i.identifier)}</a> — ${escapeHtml(line(i).slice(i.identifier.length + 3))}</li>`).join('') +
    '</ul><p>Prepare replacements in time, or discard what is no longer needed.</p>' +
    `<p style="color:#555">— Tarebook, ${escapeHtml(labName)}</p></body></html>`;
  return { subject, text, html };
}

/**
 * Queues one digest e-mail per preparer with at least one standard expiring within the notice period of the
 * lab date of `now`, and returns who was written to.
 */
export async function runExpiryDigest(now: Date, opts: DigestOptions): Promise<ExpiryDigestResult> {
  const settings = await getSettings();
  const noticeDays = settings.expiryNoticeDays ?? DEFAULT_EXPIRY_NOTICE_DAYS;
  const on = labDate(now, settings.timeZone);
  const until = addDays(on, noticeDays);
  // read before the write lock is taken (index preparations_expires_on; the columns the mail shows, the material
  // snapshot cut to its name): the lock is held only to queue the mail and audit
  const preps = await Preparation.findAll({
    attributes: ['id', 'identifier', 'analyteFormula', 'concentrationDisplay', 'status', 'expiresOn', 'createdBy', [literal("json_object('name', json_extract(snapshot_material, '$.name'))"), 'snapshotMaterial']],
    where: { expiresOn: { [Op.gte]: on, [Op.lte]: until }, status: { [Op.notIn]: [...DIGEST_EXCLUDED_STATUSES] } },
    order: [['expiresOn', 'ASC'], ['identifier', 'ASC']],
  });
  const byPreparer = new Map<number, Preparation[]>();
  for (const p of preps) byPreparer.set(p.createdBy, [...(byPreparer.get(p.createdBy) ?? []), p]);
  const users = byPreparer.size ? await User.findAll({ attributes: ['id', 'email', 'fullName', 'active'], where: { id: [...byPreparer.keys()] }, order: [['id', 'ASC']] }) : [];
  const result = await writeTransaction(async (transaction) => {
    const mails: QueuedMail[] = [];
    const recipients: ExpiryDigestResult['recipients'] = [];
    for (const u of users) {
      if (!u.active) continue;
      const items: DigestItem[] = byPreparer.get(u.id)!.map((p) => ({
        identifier: p.identifier,
        materialName: p.snapshotMaterial.name,
        analyteFormula: p.analyteFormula,
        concentrationDisplay: p.concentrationDisplay,
        status: p.status,
        expiresOn: p.expiresOn,
        daysLeft: daysBetween(on, p.expiresOn),
      }));
      mails.push({ kind: 'expiry_digest', to: u.email, preparationId: null, ...expiryDigestMail(u.fullName, items, noticeDays, on, opts.publicUrl, settings.labName) });
      recipients.push({ email: u.email, fullName: u.fullName, identifiers: items.map((i) => i.identifier) });
    }
    await enqueueMail(mails, transaction); // due at once (the server clock), whatever date the digest is run for
    await recordAudit(
      {
        actor: opts.actor ?? null,
        action: 'expiry_digest',
        entity: 'mail',
        entityId: null,
        changes: [
          { field: 'on', oldValue: null, newValue: on },
          { field: 'noticeDays', oldValue: null, newValue: noticeDays },
          { field: 'recipients', oldValue: null, newValue: recipients.map((r) => ({ email: r.email, identifiers: r.identifiers })) },
        ],
        reason: opts.actor ? 'run now by an administrator' : 'daily schedule',
      },
      transaction,
    );
    return { sent: mails.length, recipients, noticeDays, on };
  });
  opts.mailer?.kick();
  return result;
}
