/**
 * Gravimetric checks of volumetric ware (ISO 4787 / ISO 8655-6).
 * POST /api/calc/volume-check: stateless, any signed-in role; nothing is stored.
 */
import { Router } from 'express';
import { volumeCheckRequestSchema } from '../../shared/schemas/volume-check.ts';
import { calculateVolumeCheck } from '../../shared/calc/volume-check.ts';
import { requireAuth } from '../middleware/session.ts';

export function volumeChecksRouter(): Router {
  const router = Router();
  router.post('/calc/volume-check', requireAuth, (req, res) => {
    const input = volumeCheckRequestSchema.parse(req.body);
    res.json(calculateVolumeCheck(input));
  });
  return router;
}
