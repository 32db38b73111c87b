/**
 * Gravimetric checks of volumetric ware (ISO 4787 / ISO 8655-6).
 * POST /api/calc/volume-check: stateless, any signed-in role; nothing is stored.
 * GET  /api/volume-checks[?wareId=]            any signed-in role
 * POST /api/volume-checks                       chemist, technician (plan from a ware item; balance gates)
 * GET  /api/volume-checks/:key                  any signed-in role (id or VC-YYYY-NNNN)
 * POST /api/volume-checks/:key/readings         chemist, technician (append-only; corrections with a reason)
 * POST /api/volume-checks/:key/signatures       chemist (prepared, verified, returned; separation of duties)
 * GET  /api/volume-checks/:key/certificate.pdf any signed-in role (calibration certificate; audited as a print)
 * GET  /api/volumetric-ware/:id/calibration     any signed-in role (status from the latest verified check)
 */
import { Router } from 'express';
import { z } from 'zod';
import { volumeCheckPlanInputSchema, volumeCheckReadingInputSchema, volumeCheckRequestSchema, volumeCheckSignatureInputSchema } from '../../shared/schemas/volume-check.ts';
import { calculateVolumeCheck } from '../../shared/calc/volume-check.ts';
import type { Config } from '../config.ts';
import { AppError } from '../errors/app-error.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import { getVolumeCheck, listVolumeChecks, planVolumeCheck, recordReading, signVolumeCheck, volumeCheckCertificatePdf, wareCalibration } from '../services/volume-check.service.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';
const listQuery = z.object({ wareId: z.string().regex(/^[1-9]\d{0,9}$/, 'wareId is a ware id').optional() });

export function volumeChecksRouter(config: Config): Router {
  const router = Router();
  router.post('/calc/volume-check', requireAuth, (req, res) => {
    const input = volumeCheckRequestSchema.parse(req.body);
    res.json(calculateVolumeCheck(input));
  });
  router.get('/volume-checks', requireAuth, async (req, res) => {
    const q = listQuery.parse(req.query);
    res.json({ items: await listVolumeChecks(q.wareId ? { wareId: Number(q.wareId) } : {}) });
  });
  router.post('/volume-checks', requireRole('chemist', 'technician'), async (req, res) => {
    const input = volumeCheckPlanInputSchema.parse(req.body);
    const user = req.user!;
    res.status(201).json(await planVolumeCheck(input, { id: user.id, fullName: user.fullName }));
  });
  router.get('/volume-checks/:key', requireAuth, async (req, res) => {
    res.json(await getVolumeCheck(keyOf(req.params.key), req.user!.id));
  });
  router.post('/volume-checks/:key/readings', requireRole('chemist', 'technician'), async (req, res) => {
    const input = volumeCheckReadingInputSchema.parse(req.body);
    const user = req.user!;
    res.status(201).json(await recordReading(keyOf(req.params.key), input, { id: user.id, fullName: user.fullName }));
  });
  router.post('/volume-checks/:key/signatures', requireRole('chemist'), async (req, res) => {
    const input = volumeCheckSignatureInputSchema.parse(req.body);
    const user = req.user!;
    res.status(201).json(await signVolumeCheck(keyOf(req.params.key), input, { id: user.id, fullName: user.fullName }, { lockoutThreshold: config.lockoutThreshold }));
  });
  router.get('/volume-checks/:key/certificate.pdf', requireAuth, async (req, res) => {
    const user = req.user!;
    const { pdf, filename } = await volumeCheckCertificatePdf(keyOf(req.params.key), { id: user.id, fullName: user.fullName });
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `inline; filename="${filename.replace(/[^\w.-]/g, '_')}"`);
    res.setHeader('Cache-Control', 'no-store');
    res.send(pdf);
  });
  router.get('/volumetric-ware/:id/calibration', requireAuth, async (req, res) => {
    const id = keyOf(req.params.id);
    if (!/^[1-9]\d{0,9}$/.test(id)) throw AppError.notFound(`Volumetric ware ${id}`);
    res.json(await wareCalibration(Number(id)));
  });
  return router;
}
