import { Router } from 'express';
import { mixInputSchema } from '../../shared/schemas/lineage.ts';
import { requireRole } from '../middleware/session.ts';
import { createMix } from '../services/mix.service.ts';

/**
 * Mixes: several verified parent standards into one flask (chemist). The aliquot of each component is recorded
 * through POST /api/preparations/:key/aliquots with its componentId (lineage.routes.ts); the make-up is the usual one.
 */
export function mixRouter(): Router {
  const router = Router();
  router.post('/mixes', requireRole('chemist'), async (req, res) => {
    const input = mixInputSchema.parse(req.body);
    res.status(201).json(await createMix(input, { id: req.user!.id, fullName: req.user!.fullName }));
  });
  return router;
}
