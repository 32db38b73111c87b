import { z } from 'zod';

/** The roles the server knows. Checked server-side on every route (`requireRole`). */
export const ROLES = ['chemist', 'technician', 'qa', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  chemist: 'Chemist',
  technician: 'Technician',
  qa: 'QA',
  admin: 'Administrator',
};

export const roleSchema = z.enum(ROLES, { error: `Choose one of: ${ROLES.join(', ')}` });
