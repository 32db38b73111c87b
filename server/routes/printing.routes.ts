import { Router, type Response } from 'express';
import {
  createLabelTemplateInputSchema,
  labelPreviewQuerySchema,
  labelPrintInputSchema,
  prepSheetQuerySchema,
  updateLabelTemplateInputSchema,
} from '../../shared/schemas/printing.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import * as templates from '../services/label-templates.service.ts';
import * as printing from '../services/printing.service.ts';
import { parseId } from './params.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';

function sendPdf(res: Response, { pdf, filename }: { pdf: Buffer; filename: string }): void {
  res.setHeader('Content-Type', 'application/pdf');
  res.setHeader('Content-Disposition', `inline; filename="${filename.replace(/[^\w.-]/g, '_')}"`);
  res.setHeader('Cache-Control', 'no-store');
  res.send(pdf);
}

/**
 * Prep sheet (any signed-in role; each one served is audited as a print, except a preview, ?preview=1), label templates (list: any
 * signed-in role; create/edit: admin), label prints (chemist and technician; QA and admin cannot print),
 * print history and stored-print PDFs (any signed-in role), and previews (any signed-in role, not recorded).
 */
export function printingRouter(): Router {
  const router = Router();
  const actor = (u: NonNullable<Express.Request['user']>) => ({ id: u.id, fullName: u.fullName });

  router.get('/preparations/:key/prep-sheet.pdf', requireAuth, async (req, res) => {
    const q = prepSheetQuerySchema.parse(req.query);
    sendPdf(res, await printing.prepSheetPdf(keyOf(req.params.key), actor(req.user!), { preview: q.preview === '1' }));
  });

  router.get('/label-templates', requireAuth, async (_req, res) => {
    res.json(await templates.listLabelTemplates());
  });

  router.post('/label-templates', requireRole('admin'), async (req, res) => {
    const input = createLabelTemplateInputSchema.parse(req.body);
    res.status(201).json(await templates.createLabelTemplate(input, actor(req.user!)));
  });

  router.patch('/label-templates/:id', requireRole('admin'), async (req, res) => {
    const id = parseId(req.params.id, 'Label template');
    const input = updateLabelTemplateInputSchema.parse(req.body);
    res.json(await templates.updateLabelTemplate(id, input, actor(req.user!)));
  });

  router.get('/preparations/:key/labels-preview.pdf', requireAuth, async (req, res) => {
    const q = labelPreviewQuerySchema.parse(req.query);
    sendPdf(res, await printing.labelsPreviewPdf(keyOf(req.params.key), q));
  });

  router.post('/preparations/:key/label-prints', requireRole('chemist', 'technician'), async (req, res) => {
    const input = labelPrintInputSchema.parse(req.body);
    res.status(201).json(await printing.createLabelPrint(keyOf(req.params.key), input, actor(req.user!)));
  });

  router.get('/preparations/:key/label-prints', requireAuth, async (req, res) => {
    res.json(await printing.labelPrintHistory(keyOf(req.params.key)));
  });

  router.get('/label-prints/:id/labels.pdf', requireAuth, async (req, res) => {
    sendPdf(res, await printing.labelPrintPdf(parseId(req.params.id, 'Label print')));
  });

  return router;
}
