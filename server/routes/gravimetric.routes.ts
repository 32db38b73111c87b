import { Router } from 'express';
import { gravimetricPlanInputSchema, gravimetricReadingsInputSchema } from '../../shared/schemas/gravimetric.ts';
import { requireRole } from '../middleware/session.ts';
import * as gravimetric from '../services/gravimetric-dilution.service.ts';
import { GateBlockedError } from '../services/preparations.service.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';

/**
 * Gravimetric dilutions: plan one from a verified parent (chemist); record both readings at the bench (chemist,
 * technician). QA and admin cannot write here. A blocking balance gate is a 422 with the gates, like a stock plan.
 */
export function gravimetricRouter(): Router {
  const router = Router();
  const actor = (u: NonNullable<Express.Request['user']>) => ({ id: u.id, fullName: u.fullName });
  const withGates = async (res: import('express').Response, run: () => Promise<void>) => {
    try {
      await run();
    } catch (err) {
      if (err instanceof GateBlockedError) {
        res.status(422).json({ error: { code: 'gate_blocked', message: err.message, gates: err.gates } });
        return;
      }
      throw err;
    }
  };

  router.post('/preparations/:key/gravimetric-dilutions', requireRole('chemist'), async (req, res) => {
    const input = gravimetricPlanInputSchema.parse(req.body);
    await withGates(res, async () => {
      res.status(201).json(await gravimetric.createGravimetricDilution(keyOf(req.params.key), input, actor(req.user!)));
    });
  });

  router.post('/preparations/:key/gravimetric-readings', requireRole('chemist', 'technician'), async (req, res) => {
    const input = gravimetricReadingsInputSchema.parse(req.body);
    await withGates(res, async () => {
      res.status(201).json(await gravimetric.recordGravimetricReadings(keyOf(req.params.key), input, actor(req.user!)));
    });
  });

  return router;
}
