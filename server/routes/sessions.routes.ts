import { Router } from 'express';
import { AppError } from '../errors/app-error.ts';
import { requireRole } from '../middleware/session.ts';
import { endSessionByAdmin, listActiveSessions } from '../services/sessions.service.ts';

/** Active sessions: QA and admin see them; an administrator can end one (Annex 11 §12). */
export function sessionsRouter(): Router {
  const router = Router();

  router.get('/sessions', requireRole('qa', 'admin'), async (_req, res) => {
    res.json({ items: await listActiveSessions() });
  });

  router.post('/sessions/:id/end', requireRole('admin'), async (req, res) => {
    const id = String(req.params.id ?? '');
    if (!/^[A-Za-z0-9_-]{10,64}$/.test(id)) throw AppError.notFound('Session');
    await endSessionByAdmin(id, req.user!);
    res.status(204).end();
  });

  return router;
}
