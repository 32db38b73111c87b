// The role list and the session user come from the shared schemas, so client and server agree.
export { ROLES, type Role } from '../../../shared/schemas/roles.ts';
export type { SessionUser } from '../../../shared/schemas/auth.ts';
