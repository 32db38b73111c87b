/**
 * The "Extend expiry" form: the API's schema (shared/schemas/expiry.ts) plus the checks the browser can make
 * before sending, with the message at the field: later than the current expiry, not after the cap. Whether the
 * date is already past, the password and the state are the server's to say.
 */
import { z } from 'zod';
import { expiryExtensionInputSchema, type ExpiryCap, type ExpiryExtensionInput } from '../../../shared/schemas/expiry.ts';

export interface ExtendFormValues {
  newExpiresOn: string;
  reason: string;
  password: string;
  acknowledge: boolean;
}

export function extendFormSchema(currentExpiresOn: string, cap: ExpiryCap | null) {
  return expiryExtensionInputSchema
    .omit({ acknowledgeResponsibility: true })
    .extend({ acknowledge: z.boolean() })
    .superRefine((v, ctx) => {
      if (v.newExpiresOn && v.newExpiresOn <= currentExpiresOn) {
        ctx.addIssue({ code: 'custom', path: ['newExpiresOn'], message: `The new expiry must be later than the current expiry ${currentExpiresOn}` });
      } else if (cap && v.newExpiresOn > cap.date) {
        ctx.addIssue({ code: 'custom', path: ['newExpiresOn'], message: `The new expiry cannot be later than ${cap.date}, limited by ${cap.limitedBy}` });
      }
    });
}

/** The first signature needs the responsibility statement ticked (ES-08); null when fine. */
export function acknowledgeProblem(needsAcknowledgement: boolean, acknowledged: boolean): string | null {
  return needsAcknowledgement && !acknowledged ? 'Tick the statement to acknowledge it before your first signature' : null;
}

/** The request body from the form values. */
export function toInput(v: ExtendFormValues, needsAcknowledgement: boolean): ExpiryExtensionInput {
  return { newExpiresOn: v.newExpiresOn.trim(), reason: v.reason.trim(), password: v.password, ...(needsAcknowledgement && v.acknowledge ? { acknowledgeResponsibility: true as const } : {}) };
}
