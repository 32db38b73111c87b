/**
 * The pure rules of the bench aliquot form (no React): which fields a pipette needs, the client schema derived
 * from the shared `aliquotInputSchema` (so the messages are the API's own), and the request body.
 *   - a bulb (transfer) pipette delivers its nominal volume: no volume field, the body has no volumeMl;
 *   - a piston pipette is set to a volume between 10 % of nominal and nominal (the server's rule, common
 *     practice): the volume field shows, prefilled with the planned aliquot;
 *   - a correction supersedes the current aliquot and needs a reason (append-only, REQUIREMENTS CO-02).
 */
import { z } from 'zod';
import { D } from '../../../../shared/calc/decimal.ts';
import { aliquotInputSchema, type AliquotInput } from '../../../../shared/schemas/lineage.ts';
import { cleanScan } from '../../scan/resolve-scan.ts';

export type PipetteLike = { identifier: string; kind: string; nominalVolumeMl: string };

export type AliquotFields =
  | { volume: 'fixed'; deliversMl: string }
  | { volume: 'set'; minMl: string; maxMl: string };

/** What the form asks for with this (planned) pipette. */
export function aliquotFieldsFor(pipette: Pick<PipetteLike, 'kind' | 'nominalVolumeMl'>): AliquotFields {
  if (pipette.kind === 'piston_pipette') {
    const n = new D(pipette.nominalVolumeMl);
    return { volume: 'set', minMl: n.mul('0.1').toString(), maxMl: n.toString() };
  }
  return { volume: 'fixed', deliversMl: pipette.nominalVolumeMl };
}

/** "bulb pipette" from "bulb_pipette". */
export function wareKindLabel(kind: string): string {
  return kind.replace(/_/g, ' ');
}

/**
 * The identifier to send for what was scanned or typed: control characters (GS, CR) dropped and trimmed;
 * the planned pipette's exact spelling when it is the same code in other letter case.
 */
export function pipetteIdentifierToSend(raw: string, planned: string): string {
  const code = cleanScan(raw);
  return code.toUpperCase() === planned.toUpperCase() ? planned : code;
}

/** Whether the scanned code is the planned pipette, another one (the server checks kind and volume), or empty. */
export function pipetteMatch(raw: string, planned: string): 'empty' | 'planned' | 'other' {
  const code = cleanScan(raw);
  if (code === '') return 'empty';
  return code.toUpperCase() === planned.toUpperCase() ? 'planned' : 'other';
}

export type AliquotFormValues = { pipetteIdentifier: string; volumeMl: string; correctionReason: string };

const shape = aliquotInputSchema.shape;

/** The form's schema for this pipette; with `correcting`, the reason is required. */
export function aliquotFormSchema(fields: AliquotFields, correcting: boolean) {
  return z
    .object({ pipetteIdentifier: z.string(), volumeMl: z.string(), correctionReason: z.string() })
    .superRefine((v, ctx) => {
      const put = (path: keyof AliquotFormValues, r: { success: boolean; error?: z.ZodError }) => {
        if (!r.success) ctx.addIssue({ code: 'custom', path: [path], message: r.error?.issues[0]?.message ?? 'Check this value' });
        return r.success;
      };
      put('pipetteIdentifier', shape.pipetteIdentifier.safeParse(cleanScan(v.pipetteIdentifier)));
      if (fields.volume === 'set') {
        const ok = put('volumeMl', shape.volumeMl.unwrap().safeParse(v.volumeMl));
        if (ok) {
          const x = new D(v.volumeMl.trim());
          if (x.lt(fields.minMl) || x.gt(fields.maxMl)) {
            ctx.addIssue({ code: 'custom', path: ['volumeMl'], message: `Set the pipette between ${fields.minMl} and ${fields.maxMl} mL (10 % of nominal to nominal)` });
          }
        }
      }
      if (correcting) put('correctionReason', shape.correctionReason.unwrap().safeParse(v.correctionReason));
    });
}

/** The body of POST /api/preparations/:key/aliquots, checked against the shared schema. */
export function toAliquotInput(v: AliquotFormValues, opts: { fields: AliquotFields; plannedIdentifier: string; supersedesId?: number }): AliquotInput {
  const body = {
    pipetteIdentifier: pipetteIdentifierToSend(v.pipetteIdentifier, opts.plannedIdentifier),
    ...(opts.fields.volume === 'set' ? { volumeMl: v.volumeMl.trim() } : {}),
    ...(opts.supersedesId !== undefined ? { supersedesId: opts.supersedesId, correctionReason: v.correctionReason.trim() } : {}),
  };
  return aliquotInputSchema.parse(body);
}

/** The fields the server may name in `error.fields` that this form shows at a field. */
export const ALIQUOT_FORM_FIELDS = ['pipetteIdentifier', 'volumeMl', 'correctionReason'] as const;
