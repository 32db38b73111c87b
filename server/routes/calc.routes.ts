import { Router } from 'express';
import { ZodError } from 'zod';
import { DECIMAL_STRING_RE } from '../../shared/calc/index.ts';
import { calcPreparationRequestSchema, type CalcPreparationRequest } from '../../shared/schemas/calc.ts';
import { AppError } from '../errors/app-error.ts';
import { requireAuth } from '../middleware/session.ts';
import { previewPreparation } from '../services/calc.service.ts';
import { buoyancyTablePdf, getBuoyancyTable } from '../services/buoyancy-table.service.ts';
import { buoyancyTableQuerySchema } from '../../shared/schemas/buoyancy-table.ts';

const TEXT_KEYS = new Set(['unit', 'formula', 'analyteFormula', 'rounding']);
const NUMBER_MESSAGE = 'Enter a decimal number such as 100.0 or 1.5e-3 (use a point, not a comma)';

/** Dotted paths of string leaves that should be numbers but are not (e.g. "1,5"). */
function malformedNumberFields(body: unknown, prefix = '', out: Record<string, string> = {}): Record<string, string> {
  if (body && typeof body === 'object') {
    for (const [key, value] of Object.entries(body)) {
      const path = prefix ? `${prefix}.${key}` : key;
      if (typeof value === 'string') {
        if (!TEXT_KEYS.has(key) && !DECIMAL_STRING_RE.test(value.trim())) out[path] = NUMBER_MESSAGE;
      } else {
        malformedNumberFields(value, path, out);
      }
    }
  }
  return out;
}

/**
 * zod 4 keeps running refinements after a failed regex; a refinement that builds a Decimal from
 * "1,5" then throws a plain Error. Report that as the validation error it is (never a 500).
 */
function parseRequest(body: unknown): CalcPreparationRequest {
  try {
    return calcPreparationRequestSchema.parse(body);
  } catch (err) {
    if (err instanceof ZodError) throw err;
    const fields = malformedNumberFields(body);
    const count = Object.keys(fields).length;
    throw AppError.validation(count === 1 ? NUMBER_MESSAGE : count ? `${count} fields need attention` : 'A number in the request could not be read', fields);
  }
}

export function calcRouter(): Router {
  const router = Router();
  // ZodError → 400 validation_failed; CalcError → 400 with fields[field] (error middleware).
  router.post('/calc/preparation', requireAuth, async (req, res) => {
    const input = parseRequest(req.body);
    res.json(await previewPreparation(input));
  });
  // GET /api/calc/buoyancy-table?t=&p=&rh=&weightDensity= (any signed-in role): B = m/m' and 1/B per named sample.
  router.get('/calc/buoyancy-table', requireAuth, async (req, res) => {
    res.json(await getBuoyancyTable(buoyancyTableQuerySchema.parse(req.query)));
  });
  // The same table as an A4 PDF to post at the balance.
  router.get('/calc/buoyancy-table.pdf', requireAuth, async (req, res) => {
    const { pdf, filename } = await buoyancyTablePdf(buoyancyTableQuerySchema.parse(req.query), req.user!.fullName);
    res.setHeader('Content-Type', 'application/pdf');
    res.setHeader('Content-Disposition', `inline; filename="${filename}"`);
    res.setHeader('Cache-Control', 'no-store');
    res.send(pdf);
  });
  return router;
}
