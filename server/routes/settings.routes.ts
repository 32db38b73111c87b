import { Router } from 'express';
import { updateLabSettingsInputSchema } from '../../shared/schemas/settings.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import { getSettings, updateSettings } from '../services/settings.service.ts';

export function settingsRouter(): Router {
  const router = Router();

  router.get('/settings', requireAuth, async (_req, res) => {
    res.json(await getSettings());
  });

  router.put('/settings', requireRole('admin'), async (req, res) => {
    const input = updateLabSettingsInputSchema.parse(req.body);
    res.json(await updateSettings(input, req.user!));
  });

  return router;
}
