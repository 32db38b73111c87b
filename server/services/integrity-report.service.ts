/**
 * The daily integrity run (issue 10 §1, §4; server/jobs/scheduler.ts, 06:00 lab time, after the expiry digest):
 * 1. the full seal check of every signed record (record-integrity.ts), so a break is found, audited and e-mailed
 *    even when nobody opens the record;
 * 2. the audit chain check (audit.service.ts verifyAuditChain, against the latest anchor);
 * 3. a new anchor: the chain head { id, hash } appended to the anchor log outside the database;
 * 4. one e-mail to every active QA account with the chain head and the anchor, the chain result and the records
 *    whose seal is broken, so the head also lives in QA's mailbox;
 * 5. an audit entry "integrity_report" with the head anchored.
 */
import { Op } from 'sequelize';
import { Preparation, User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { enqueueMail, type Mailer } from '../mail/mailer.ts';
import { recordAudit, verifyAuditChain, writeAnchor, type ChainAnchor } from './audit.service.ts';
import { SEALED_STATUSES } from './record-integrity.ts';
import { recordSeal } from './signatures.service.ts';
import type { AuditVerifyResult } from '../../shared/schemas/audit.ts';
import { labDate } from '../../shared/prep/lab-time.ts';
import { getSettings } from './settings.service.ts';

export interface IntegrityReport {
  anchor: ChainAnchor | null;
  chain: AuditVerifyResult;
  /** identifiers of signed records whose seal is broken */
  sealBroken: string[];
  sent: number;
}

export function integrityMail(r: Omit<IntegrityReport, 'sent'>, on: string): { subject: string; text: string; html: string } {
  const head = r.anchor ? `#${r.anchor.id} ${r.anchor.hash}` : '(the trail is empty)';
  const chain = r.chain.ok ? `intact (${r.chain.checked} entries checked)` : `BROKEN at #${r.chain.firstBroken?.id}: ${r.chain.firstBroken?.reason} (${r.chain.checked} entries checked)`;
  const subject = `Daily integrity report ${on}: audit chain ${r.chain.ok ? 'intact' : 'BROKEN'}, head #${r.anchor?.id ?? 0}${r.sealBroken.length ? `, ${r.sealBroken.length} seal${r.sealBroken.length === 1 ? '' : 's'} broken` : ''}`;
  const lines = [
    `Audit chain: ${chain}`,
    `Chain head anchored ${r.anchor?.at ?? '—'}: ${head}`,
    'Keep this e-mail: the head above lets anyone confirm later that no entry up to it was removed or rewritten.',
    '',
    r.sealBroken.length ? `Signed records that no longer match their signatures (seal broken): ${r.sealBroken.join(', ')}` : 'Every signed record matches its signatures.',
  ];
  const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
  return { subject, text: lines.join('\n'), html: `<!doctype html><html><body style="font-family: sans-serif">${lines.map((l) => (l ? `<p>${esc(l)}</p>` : '')).join('')}</body></html>` };
}

export async function runDailyIntegrity(now: Date, opts: { mailer?: Mailer } = {}): Promise<IntegrityReport> {
  const sealBroken: string[] = [];
  const signed = await Preparation.findAll({ where: { status: { [Op.in]: [...SEALED_STATUSES] } }, order: [['id', 'ASC']] });
  for (const p of signed) if (await recordSeal(p)) sealBroken.push(p.identifier);
  const chain = await verifyAuditChain();
  const anchor = await writeAnchor(now);
  const content = integrityMail({ anchor, chain, sealBroken }, labDate(now, (await getSettings()).timeZone)); // the lab's day
  let sent = 0;
  await writeTransaction(async (transaction) => {
    const qa = await User.findAll({ where: { role: 'qa', active: true }, order: [['id', 'ASC']], transaction });
    await enqueueMail(qa.map((u) => ({ kind: 'integrity_report', to: u.email, preparationId: null, ...content })), transaction);
    sent = qa.length;
    await recordAudit(
      {
        actor: null,
        action: 'integrity_report',
        entity: 'audit_trail',
        entityId: null,
        changes: [
          { field: 'anchor', oldValue: null, newValue: anchor ? `#${anchor.id} ${anchor.hash}` : null },
          { field: 'chain', oldValue: null, newValue: chain.ok ? 'intact' : 'broken' },
          { field: 'sealBroken', oldValue: null, newValue: sealBroken },
          { field: 'sent', oldValue: null, newValue: sent },
        ],
      },
      transaction,
    );
  });
  opts.mailer?.kick();
  return { anchor, chain, sealBroken, sent };
}
