/**
 * Runs the preparation calculation in the browser, exactly as the server does:
 * form values → request → shared zod schema → `calculatePreparation`.
 * Every failure is turned into messages keyed by form field, so the page can show them in place.
 */
import { calculatePreparation } from '../../../shared/calc/preparation.ts';
import { CalcError } from '../../../shared/calc/errors.ts';
import { calcPreparationRequestSchema } from '../../../shared/schemas/calc.ts';
import { calcFormSchema, formFieldFor, toRequest, type CalcFormIn, type FormField, type FormRequest } from './calc-form-schema.ts';
import type { PreparationView } from './result-types.ts';

export type FieldMessages = Partial<Record<FormField, string>>;

export type LiveResult =
  | { status: 'ok'; request: FormRequest; result: PreparationView }
  | { status: 'invalid'; fields: FieldMessages; general: string[] }
  | { status: 'calc-error'; fields: FieldMessages; general: string[]; request: FormRequest };

function collect(issues: readonly { path: readonly PropertyKey[]; message: string }[], values: CalcFormIn | undefined) {
  const fields: FieldMessages = {};
  const general: string[] = [];
  for (const issue of issues) {
    const path = issue.path.map(String).join('.');
    const field = formFieldFor(path, values as never);
    if (field) fields[field] ??= issue.message;
    else general.push(path ? `${path}: ${issue.message}` : issue.message);
  }
  return { fields, general };
}

export function runLiveCalculation(values: CalcFormIn, rounding?: 'half-even' | 'half-up'): LiveResult {
  const form = calcFormSchema.safeParse(values);
  if (!form.success) return { status: 'invalid', ...collect(form.error.issues, values) };

  const request = toRequest(form.data, rounding);
  const parsed = calcPreparationRequestSchema.safeParse(request);
  if (!parsed.success) return { status: 'invalid', ...collect(parsed.error.issues, values) };

  try {
    const result = calculatePreparation(parsed.data);
    return { status: 'ok', request, result };
  } catch (e) {
    if (e instanceof CalcError) {
      const field = formFieldFor(e.field, form.data);
      return {
        status: 'calc-error',
        request,
        fields: field ? { [field]: e.message } : {},
        general: field ? [] : [e.message],
      };
    }
    // A bug in the core must not blank the page; say so plainly.
    return {
      status: 'calc-error',
      request,
      fields: {},
      general: [`The calculation failed unexpectedly: ${e instanceof Error ? e.message : String(e)}`],
    };
  }
}
