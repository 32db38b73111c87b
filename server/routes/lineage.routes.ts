import { Router } from 'express';
import { aliquotInputSchema, createSeriesInputSchema, dilutionInputSchema, seriesProposalInputSchema } from '../../shared/schemas/lineage.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import * as lineage from '../services/lineage.service.ts';
import * as series from '../services/series.service.ts';
import { seriesListQuerySchema } from '../../shared/schemas/lineage.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';

/**
 * Standards made from standards: plan a dilution or a calibration series (chemist), record the delivered
 * aliquot (chemist, technician), read a series (any signed-in role). QA cannot write here.
 */
export function lineageRouter(): Router {
  const router = Router();
  const actor = (u: NonNullable<Express.Request['user']>) => ({ id: u.id, fullName: u.fullName });

  router.post('/preparations/:key/dilutions', requireRole('chemist'), async (req, res) => {
    const input = dilutionInputSchema.parse(req.body);
    res.status(201).json(await lineage.createDilution(keyOf(req.params.key), input, actor(req.user!)));
  });

  router.post('/preparations/:key/aliquots', requireRole('chemist', 'technician'), async (req, res) => {
    const input = aliquotInputSchema.parse(req.body);
    res.status(201).json(await lineage.recordAliquot(keyOf(req.params.key), input, actor(req.user!)));
  });

  router.post('/series/proposal', requireRole('chemist'), async (req, res) => {
    const input = seriesProposalInputSchema.parse(req.body);
    res.json(await lineage.proposeSeriesFor(input, actor(req.user!)));
  });

  router.post('/series', requireRole('chemist'), async (req, res) => {
    const input = createSeriesInputSchema.parse(req.body);
    res.status(201).json(await lineage.createSeries(input, actor(req.user!)));
  });

  // GET /series (the list) before /series/:key; POST /series/proposal is a POST, so no clash
  router.get('/series', requireAuth, async (req, res) => {
    res.json(await series.listSeries(seriesListQuerySchema.parse(req.query)));
  });

  router.get('/series/:key', requireAuth, async (req, res) => {
    res.json(await series.getSeriesDetail(keyOf(req.params.key)));
  });

  // the series sheet (any signed-in role; each one served is audited as a print, like the prep sheet)
  router.get('/series/:key/sheet.pdf', requireAuth, async (req, res) => {
    const { pdf, filename } = await series.seriesSheetPdf(keyOf(req.params.key), actor(req.user!));
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `inline; filename="${filename.replace(/[^\w.-]/g, '_')}"`);
    res.setHeader('Cache-Control', 'no-store');
    res.send(pdf);
  });

  return router;
}
