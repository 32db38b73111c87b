/**
 * In-process scheduler (node-cron): the daily expiry digest at 06:00 and the integrity report at 06:05 in the lab's time zone
 * (settings.timeZone, read at start-up; a changed zone applies after a restart). Started by server/index.ts
 * after the server listens; never in tests unless a test starts it. A failed run is logged, never thrown.
 */
import cron, { type ScheduledTask } from 'node-cron';
import type { Mailer } from '../mail/mailer.ts';
import { runExpiryDigest } from '../services/expiry-digest.service.ts';
import { getSettings } from '../services/settings.service.ts';
import { runDailyIntegrity } from '../services/integrity-report.service.ts';
import { logger } from '../logger.ts';

/** Minute, hour, day of month, month, day of week: every day at 06:00. */
export const EXPIRY_DIGEST_CRON = '0 6 * * *';
/** Every day at 06:05: the seal sweep, the chain check, the chain head anchored and e-mailed to QA (integrity-report.service.ts). */
export const INTEGRITY_CRON = '5 6 * * *';

export interface SchedulerOptions {
  publicUrl: () => string;
  mailer?: Mailer;
  log?: (message: string) => void;
}

export interface Scheduler {
  timeZone: string;
  stop(): Promise<void>;
}

export async function startScheduler(opts: SchedulerOptions): Promise<Scheduler> {
  const log = opts.log ?? ((m: string) => logger.info({ job: 'scheduler' }, m));
  const { timeZone } = await getSettings();
  const tasks: ScheduledTask[] = [
    cron.schedule(
      EXPIRY_DIGEST_CRON,
      async () => {
        try {
          const r = await runExpiryDigest(new Date(), { publicUrl: opts.publicUrl(), mailer: opts.mailer, actor: null });
          log(`Expiry digest for ${r.on}: ${r.sent} e-mail${r.sent === 1 ? '' : 's'} queued`);
        } catch (err) {
          log(`Expiry digest failed: ${(err as Error).message}`);
        }
      },
      { timezone: timeZone, name: 'expiry-digest', noOverlap: true },
    ),
    cron.schedule(
      INTEGRITY_CRON,
      async () => {
        try {
          const r = await runDailyIntegrity(new Date(), { mailer: opts.mailer });
          log(`Integrity report: chain ${r.chain.ok ? 'intact' : 'BROKEN'}, head #${r.anchor?.id ?? 0} anchored, ${r.sealBroken.length} seal(s) broken, ${r.sent} e-mail(s) queued`);
        } catch (err) {
          log(`Integrity report failed: ${(err as Error).message}`);
        }
      },
      { timezone: timeZone, name: 'integrity-report', noOverlap: true },
    ),
  ];
  return {
    timeZone,
    stop: async () => {
      for (const t of tasks) await t.stop();
    },
  };
}
