import { Router, type Response } from 'express';
import { reviewFlagsInputSchema, traceQuerySchema } from '../../shared/schemas/trace.ts';
import type { Config } from '../config.ts';
import type { Mailer } from '../mail/mailer.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import { runExpiryDigest } from '../services/expiry-digest.service.ts';
import * as traceService from '../services/trace.service.ts';
import { publicUrlOf } from './signatures.routes.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';
const safeName = (name: string) => name.replace(/[^\w.-]/g, '_');

function sendFile(res: Response, type: string, body: Buffer | string, filename: string): void {
  res.setHeader('Content-Type', type);
  res.setHeader('Content-Disposition', `${type.startsWith('application/pdf') ? 'inline' : 'attachment'}; filename="${safeName(filename)}"`);
  res.setHeader('Cache-Control', 'no-store');
  res.send(body);
}

/**
 * Trace (qa, admin, chemist): backward and forward graph of any identifier, and the traceability report of
 * one standard (PDF, CSV; each served is audited as an export). Review flags: raised by QA on the whole
 * forward set (POST), listed on a record by any signed-in role (GET). Expiry digest: admin runs it now.
 * Flags also reach the record detail as `reviewFlag` (the latest), through the signatures view.
 */
export function traceRouter(config: Config): Router {
  const router = Router();
  const actor = (u: NonNullable<Express.Request['user']>) => ({ id: u.id, fullName: u.fullName });
  const tracers = requireRole('qa', 'admin', 'chemist');

  router.get('/trace/:identifier', tracers, async (req, res) => {
    const q = traceQuerySchema.parse(req.query);
    res.json(await traceService.trace(keyOf(req.params.identifier), q));
  });

  router.post('/trace/:identifier/review-flags', requireRole('qa'), async (req, res) => {
    const input = reviewFlagsInputSchema.parse(req.body);
    res.status(201).json(await traceService.flagForReview(keyOf(req.params.identifier), input, actor(req.user!)));
  });

  router.get('/trace/:identifier/report.pdf', tracers, async (req, res) => {
    const { pdf, filename } = await traceService.traceReportPdf(keyOf(req.params.identifier), actor(req.user!));
    sendFile(res, 'application/pdf', pdf, filename);
  });

  router.get('/trace/:identifier/report.csv', tracers, async (req, res) => {
    const { csv, filename } = await traceService.traceReportCsv(keyOf(req.params.identifier), actor(req.user!));
    sendFile(res, 'text/csv; charset=utf-8', csv, filename);
  });

  router.get('/trace/:identifier/forward-report.pdf', tracers, async (req, res) => {
    const { pdf, filename } = await traceService.forwardReportPdf(keyOf(req.params.identifier), traceQuerySchema.parse(req.query), actor(req.user!));
    sendFile(res, 'application/pdf', pdf, filename);
  });

  router.get('/trace/:identifier/forward-report.csv', tracers, async (req, res) => {
    const { csv, filename } = await traceService.forwardReportCsv(keyOf(req.params.identifier), traceQuerySchema.parse(req.query), actor(req.user!));
    sendFile(res, 'text/csv; charset=utf-8', csv, filename);
  });

  router.get('/preparations/:key/review-flags', requireAuth, async (req, res) => {
    res.json(await traceService.reviewFlagsOf(keyOf(req.params.key)));
  });

  router.post('/admin/expiry-digest', requireRole('admin'), async (req, res) => {
    const result = await runExpiryDigest(new Date(), {
      publicUrl: publicUrlOf(req, config),
      mailer: req.app.locals.mailer as Mailer | undefined,
      actor: actor(req.user!),
    });
    res.json(result);
  });

  return router;
}
