import { Router } from 'express';
import { calcPreparationRequestSchema } from '../../shared/schemas/calc.ts';
import { requireAuth } from '../middleware/session.ts';
import { previewPreparation } from '../services/calc.service.ts';

export function calcRouter(): Router {
  const router = Router();
  // ZodError → 400 validation_failed; CalcError → 400 with fields[field] (error middleware).
  router.post('/calc/preparation', requireAuth, (req, res) => {
    const input = calcPreparationRequestSchema.parse(req.body);
    res.json(previewPreparation(input));
  });
  return router;
}
