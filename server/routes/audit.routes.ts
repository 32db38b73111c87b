import { Router } from 'express';
import { z } from 'zod';
import { auditFilterSchema, auditListQuerySchema } from '../../shared/schemas/audit.ts';
import { AppError } from '../errors/app-error.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import * as audit from '../services/audit.service.ts';
import { getSettings } from '../services/settings.service.ts';

/** Security records (sign-ins, accounts) are QA/admin reading even through the per-record endpoint. */
const RESTRICTED_ENTITIES = new Set(['session', 'user', 'audit_trail']);

const recordParams = z.object({
  entity: z.string().regex(/^[a-z][a-z0-9_]{0,63}$/, 'Unknown record type'),
  entityId: z.string().min(1).max(128),
});

/**
 * The audit trail is read-only over HTTP: list, export, verify, per-record trail. No route updates or
 * deletes an entry (REQUIREMENTS AT-05); unknown methods fall through to the JSON 404.
 */
export function auditRouter(): Router {
  const router = Router();
  const reviewers = requireRole('qa', 'admin');

  router.get('/audit', reviewers, async (req, res) => {
    res.json(await audit.listAudit(auditListQuerySchema.parse(req.query), (await getSettings()).timeZone)); // from/to are lab days
  });

  router.get('/audit/export.csv', reviewers, async (req, res) => {
    const filter = auditFilterSchema.parse(req.query);
    await audit.recordExport(req.user!, filter);
    const stamp = new Date().toISOString().replace(/[-:]/g, '').replace(/\.\d+Z$/, 'Z');
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="tarebook-audit-${stamp}.csv"`);
    res.setHeader('Cache-Control', 'no-store');
    res.write(audit.csvLine([...audit.AUDIT_CSV_COLUMNS]));
    const { timeZone } = await getSettings();
    for await (const entry of audit.allAudit(filter, timeZone)) res.write(audit.auditCsvLine(entry));
    res.end();
  });

  router.get('/audit/actors', reviewers, async (_req, res) => {
    res.json({ items: await audit.listActors() });
  });

  router.post('/audit/verify', reviewers, async (req, res) => {
    res.json(await audit.verifyAndRecord(req.user!));
  });

  router.get('/audit/records/:entity/:entityId', requireAuth, async (req, res) => {
    const parsed = recordParams.safeParse(req.params);
    if (!parsed.success) throw AppError.notFound('Record');
    const { entity, entityId } = parsed.data;
    if (RESTRICTED_ENTITIES.has(entity) && !['qa', 'admin'].includes(req.user!.role)) {
      throw new AppError('forbidden', 403, 'This needs the QA or admin role');
    }
    res.json({ items: entity === 'preparation' ? await audit.preparationTrail(entityId) : await audit.recordTrail(entity, entityId) });
  });

  return router;
}
