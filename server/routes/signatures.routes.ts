import { Router, type Request } from 'express';
import { signatureInputSchema } from '../../shared/schemas/preparations.ts';
import type { Config } from '../config.ts';
import type { Mailer } from '../mail/mailer.ts';
import { requireRole } from '../middleware/session.ts';
import { getPreparation } from '../services/preparations.service.ts';
import { sign } from '../services/signatures.service.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';

/** The base of e-mail links: PUBLIC_URL, else the listening address (set by server/index.ts), else the port. */
export const publicUrlOf = (req: Request, config: Config) => config.publicUrl ?? (req.app.locals.publicUrl as string | undefined) ?? `http://localhost:${config.port}`;

/**
 * POST /api/preparations/:key/signatures (chemist, QA): sign prepared | verified | returned | discarded with the
 * password re-entered. Which meaning each role may sign, the order, and who may verify are enforced by the
 * service (403 / 409); technicians and admin are refused here.
 */
export function signaturesRouter(config: Config): Router {
  const router = Router();
  router.post('/preparations/:key/signatures', requireRole('chemist', 'qa'), async (req, res) => {
    const input = signatureInputSchema.parse(req.body);
    const user = req.user!;
    const id = await sign(keyOf(req.params.key), input, { id: user.id, fullName: user.fullName }, {
      lockoutThreshold: config.lockoutThreshold,
      publicUrl: publicUrlOf(req, config),
      mailer: req.app.locals.mailer as Mailer | undefined,
    });
    res.status(201).json(await getPreparation(String(id), user.id));
  });
  return router;
}
