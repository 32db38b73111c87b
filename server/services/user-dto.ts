import type { SessionUser } from '../../shared/schemas/auth.ts';
import type { User as UserDto } from '../../shared/schemas/users.ts';
import type { User } from '../db/models/index.ts';

export function toSessionUser(u: User): SessionUser {
  return { id: u.id, email: u.email, fullName: u.fullName, initials: u.initials, role: u.role, mustChangePassword: Boolean(u.mustChangePassword) };
}

export function toUserDto(u: User): UserDto {
  return {
    id: u.id,
    email: u.email,
    fullName: u.fullName,
    initials: u.initials,
    role: u.role,
    active: Boolean(u.active),
    locked: u.lockedAt !== null && u.lockedAt !== undefined,
    lockedAt: u.lockedAt ?? null,
    failedLoginCount: u.failedLoginCount ?? 0,
    lastLoginAt: u.lastLoginAt ?? null,
    mustChangePassword: Boolean(u.mustChangePassword),
    createdAt: u.createdAt,
    updatedAt: u.updatedAt,
  };
}
