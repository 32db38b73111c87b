/**
 * Outgoing mail. Messages are queued in mail_queue by `enqueueMail`, inside the caller's write transaction
 * (so a signature and its e-mails commit together), and delivered after commit by the in-process worker
 * (`Mailer.kick()`), with retries and exponential backoff. A failed send is logged and recorded on the row;
 * it never touches the transaction that queued it. Tests wait for delivery with `mailer.flush()`.
 */
import nodemailer from 'nodemailer';
import { Op, type Transaction } from 'sequelize';
import type { Config } from '../config.ts';
import { MailQueueItem } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import type { MailContent } from './templates.ts';
import { logger } from '../logger.ts';

export interface OutgoingMail {
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string;
}

/** What the worker needs from a transport (nodemailer's Transporter has it). */
export interface MailTransport {
  sendMail(message: OutgoingMail): Promise<unknown>;
  close?(): void;
}

export interface QueuedMail extends MailContent {
  kind: string;
  to: string;
  preparationId?: number | null;
}

/** Queue messages in the caller's transaction; delivery happens after commit (Mailer.kick). */
export async function enqueueMail(messages: QueuedMail[], transaction: Transaction, now = new Date()): Promise<void> {
  const at = now.toISOString();
  for (const m of messages) {
    await MailQueueItem.create(
      {
        kind: m.kind,
        preparationId: m.preparationId ?? null,
        toAddress: m.to,
        subject: m.subject,
        text: m.text,
        html: m.html,
        status: 'pending',
        attempts: 0,
        lastError: null,
        // the seed's fixed dates are in the past, so those rows are due at once
        nextAttemptAt: at,
        createdAt: at,
        sentAt: null,
      },
      { transaction },
    );
  }
}

export interface MailerOptions {
  transport: MailTransport;
  from: string;
  /** first retry after this many ms, doubling each time (default 30 s) */
  retryBaseMs?: number;
  /** attempts before a row is marked failed (default 6) */
  maxAttempts?: number;
  log?: (message: string) => void;
}

export class Mailer {
  readonly from: string;
  private readonly transport: MailTransport;
  private readonly retryBaseMs: number;
  private readonly maxAttempts: number;
  private readonly log: (message: string) => void;
  private running: Promise<void> | null = null;
  private again = false;
  private timer: NodeJS.Timeout | null = null;
  private closed = false;

  constructor(opts: MailerOptions) {
    this.transport = opts.transport;
    this.from = opts.from;
    this.retryBaseMs = opts.retryBaseMs ?? 30_000;
    this.maxAttempts = opts.maxAttempts ?? 6;
    this.log = opts.log ?? ((m) => logger.warn({ component: 'mail' }, m));
  }

  /** Start delivering what is due (returns at once; errors are logged, never thrown). */
  kick(): void {
    if (this.closed) return;
    void this.run();
  }

  /** Deliver until nothing is pending (waiting out retry delays), or throw after timeoutMs. */
  async flush(timeoutMs = 10_000): Promise<void> {
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      await this.run();
      const next = await MailQueueItem.findOne({ where: { status: 'pending' }, order: [['nextAttemptAt', 'ASC']] });
      if (!next) return;
      const wait = Math.max(0, new Date(next.nextAttemptAt).getTime() - Date.now());
      if (Date.now() + wait > deadline) throw new Error(`mail still pending after ${timeoutMs} ms (row ${next.id}: ${next.lastError ?? 'not yet sent'})`);
      await new Promise((r) => setTimeout(r, Math.min(wait, 50)));
    }
  }

  close(): void {
    this.closed = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    this.transport.close?.();
  }

  private run(): Promise<void> {
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = (async () => {
      try {
        do {
          this.again = false;
          await this.deliverDue();
        } while (this.again && !this.closed);
      } catch (err) {
        this.log(`mail worker: ${(err as Error).message}`);
      } finally {
        this.running = null;
      }
      await this.schedule();
    })();
    return this.running;
  }

  private async deliverDue(): Promise<void> {
    const due = await MailQueueItem.findAll({
      where: { status: 'pending', nextAttemptAt: { [Op.lte]: new Date().toISOString() } },
      order: [['id', 'ASC']],
      limit: 50,
    });
    for (const row of due) {
      if (this.closed) return;
      let error: string | null = null;
      try {
        await this.transport.sendMail({ from: this.from, to: row.toAddress, subject: row.subject, text: row.text, html: row.html });
      } catch (err) {
        error = (err as Error).message || String(err);
      }
      await writeTransaction(async (transaction) => {
        await row.reload({ transaction });
        row.attempts = row.attempts + 1;
        if (error === null) {
          row.status = 'sent';
          row.sentAt = new Date().toISOString();
          row.lastError = null;
        } else {
          row.lastError = error.slice(0, 1000);
          if (row.attempts >= this.maxAttempts) row.status = 'failed';
          else row.nextAttemptAt = new Date(Date.now() + this.retryBaseMs * 2 ** (row.attempts - 1)).toISOString();
        }
        await row.save({ transaction });
      });
      if (error !== null) this.log(`mail ${row.id} to ${row.toAddress} not sent (attempt ${row.attempts}${row.status === 'failed' ? ', giving up' : ''}): ${error}`);
    }
  }

  /** Wake up for the next retry. */
  private async schedule(): Promise<void> {
    if (this.closed) return;
    const next = await MailQueueItem.findOne({ where: { status: 'pending' }, order: [['nextAttemptAt', 'ASC']] }).catch(() => null);
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    if (!next) return;
    const wait = Math.max(0, new Date(next.nextAttemptAt).getTime() - Date.now());
    this.timer = setTimeout(() => this.kick(), Math.min(wait, 2 ** 31 - 1));
    this.timer.unref();
  }
}

export function createMailer(opts: MailerOptions): Mailer {
  return new Mailer(opts);
}

/** A nodemailer SMTP transport from the configuration (MAIL_MODE=smtp), or to the local fake server. */
export function smtpTransport(config: Config, fake?: { host: string; port: number }): MailTransport {
  if (fake) return nodemailer.createTransport({ host: fake.host, port: fake.port, secure: false, ignoreTLS: true }) as unknown as MailTransport;
  const m = config.mail;
  return nodemailer.createTransport({
    host: m.smtpHost,
    port: m.smtpPort,
    secure: m.smtpSecure,
    ...(m.smtpUser ? { auth: { user: m.smtpUser, pass: m.smtpPass } } : {}),
  }) as unknown as MailTransport;
}
