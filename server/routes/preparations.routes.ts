import { Router, type Response } from 'express';
import {
  createPreparationInputSchema,
  listPreparationsQuerySchema,
  makeUpInputSchema,
  planInputSchema,
  weighingInputSchema,
  type PlanInput,
  type CreatePreparationInput,
  type WeighingInput,
} from '../../shared/schemas/preparations.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import * as preparations from '../services/preparations.service.ts';

const keyOf = (raw: string | string[] | undefined) => (Array.isArray(raw) ? raw[0] : raw) ?? '';

/** 422 with the gates that blocked (the generic error body has no room for them). */
async function withGates(res: Response, run: () => Promise<void>): Promise<void> {
  try {
    await run();
  } catch (err) {
    if (err instanceof preparations.GateBlockedError) {
      res.status(422).json({ error: { code: 'gate_blocked', message: err.message, gates: err.gates } });
      return;
    }
    throw err;
  }
}

/**
 * Plan (chemist; preview also admin), weigh and make up (chemist, technician), read (any signed-in role).
 * QA cannot write here at all. Weighings and make-ups have no PATCH/DELETE: corrections are new entries.
 */
export function preparationsRouter(): Router {
  const router = Router();
  const actor = (u: NonNullable<Express.Request['user']>) => ({ id: u.id, fullName: u.fullName });

  router.post('/preparations/preview', requireRole('chemist', 'admin'), async (req, res) => {
    const input = planInputSchema.parse(req.body) as PlanInput;
    await withGates(res, async () => {
      res.json(await preparations.previewPreparation(input));
    });
  });

  router.post('/preparations', requireRole('chemist'), async (req, res) => {
    const input = createPreparationInputSchema.parse(req.body) as CreatePreparationInput;
    await withGates(res, async () => {
      res.status(201).json(await preparations.createPreparation(input, actor(req.user!)));
    });
  });

  router.get('/preparations', requireAuth, async (req, res) => {
    const query = listPreparationsQuerySchema.parse(req.query);
    res.json(await preparations.listPreparations(query, actor(req.user!)));
  });

  router.get('/preparations/:key', requireAuth, async (req, res) => {
    res.json(await preparations.getPreparation(keyOf(req.params.key), req.user!.id));
  });

  router.post('/preparations/:key/weighings', requireRole('chemist', 'technician'), async (req, res) => {
    const input = weighingInputSchema.parse(req.body) as WeighingInput;
    await withGates(res, async () => {
      res.status(201).json(await preparations.recordWeighing(keyOf(req.params.key), input, actor(req.user!), { lockoutThreshold: req.app.locals.lockoutThreshold }));
    });
  });

  router.post('/preparations/:key/make-up', requireRole('chemist', 'technician'), async (req, res) => {
    const input = makeUpInputSchema.parse(req.body);
    await withGates(res, async () => {
      res.status(201).json(await preparations.recordMakeUp(keyOf(req.params.key), input, actor(req.user!), { lockoutThreshold: req.app.locals.lockoutThreshold }));
    });
  });

  return router;
}
