import { Router } from 'express';
import { requireAuth } from '../middleware/session.ts';
import * as inventory from '../services/inventory.service.ts';

/** Read-only lists for any signed-in role. */
export function inventoryRouter(): Router {
  const router = Router();
  router.get('/materials', requireAuth, async (_req, res) => {
    res.json({ items: await inventory.listMaterials() });
  });
  router.get('/balances', requireAuth, async (_req, res) => {
    res.json({ items: await inventory.listBalances() });
  });
  router.get('/volumetric-ware', requireAuth, async (_req, res) => {
    res.json({ items: await inventory.listVolumetricWare() });
  });
  router.get('/solvents', requireAuth, async (_req, res) => {
    res.json({ items: await inventory.listSolvents() });
  });
  return router;
}
