import { Router } from 'express';
import { requireAuth } from '../middleware/session.ts';
import { workListsFor } from '../services/worklists.service.ts';

/** GET /api/worklists (any signed-in role): the home page's work lists for the signed-in user. */
export function worklistsRouter(): Router {
  const router = Router();
  router.get('/worklists', requireAuth, async (req, res) => {
    const u = req.user!;
    res.json(await workListsFor({ id: u.id, fullName: u.fullName, role: u.role }));
  });
  return router;
}
