import { Router } from 'express';
import { expiryExtensionInputSchema } from '../../shared/schemas/expiry.ts';
import type { Config } from '../config.ts';
import { requireRole } from '../middleware/session.ts';
import { extendExpiry } from '../services/expiry-extension.service.ts';
import { getPreparation } from '../services/preparations.service.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';

/**
 * POST /api/preparations/:key/expiry-extensions (QA only): extend the expiry with a reason and the QA user's
 * e-signature (password re-entered). 201 with the detail; 400 fields, 401/423 password, 409 state, 422 date.
 */
export function expiryRouter(config: Config): Router {
  const router = Router();
  router.post('/preparations/:key/expiry-extensions', requireRole('qa'), async (req, res) => {
    const input = expiryExtensionInputSchema.parse(req.body);
    const user = req.user!;
    const id = await extendExpiry(keyOf(req.params.key), input, { id: user.id, fullName: user.fullName }, { lockoutThreshold: config.lockoutThreshold });
    res.status(201).json(await getPreparation(String(id), user.id));
  });
  return router;
}
