/**
 * User administration (admin role). Accounts are deactivated, never deleted, so user ids are never
 * reused (REQUIREMENTS ES-05). Every change is audited field by field in the same transaction (AT-01, AC-04).
 */
import type { CreateUserInput, UpdateUserInput, User as UserDto } from '../../shared/schemas/users.ts';
import { User } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';
import { writeTransaction, diffFields } from '../db/transaction.ts';
import { recordAudit } from './audit.service.ts';
import { hashPassword } from './passwords.ts';
import { toUserDto } from './user-dto.ts';

type Actor = { id: number; fullName: string };

async function load(id: number): Promise<User> {
  const user = Number.isSafeInteger(id) && id > 0 ? await User.findByPk(id) : null;
  if (!user) throw AppError.notFound('User');
  return user;
}

export async function listUsers(): Promise<UserDto[]> {
  const users = await User.findAll({ order: [['fullName', 'ASC'], ['id', 'ASC']] });
  return users.map(toUserDto);
}

export async function getUser(id: number): Promise<UserDto> {
  return toUserDto(await load(id));
}

/** The fields of a user the audit trail compares (never the password hash). */
const audited = (u: User) => ({ email: u.email, fullName: u.fullName, initials: u.initials, role: u.role, active: Boolean(u.active) });

export async function createUser(input: CreateUserInput, actor: Actor): Promise<UserDto> {
  const email = input.email.trim().toLowerCase();
  if (await User.findOne({ where: { email } })) {
    throw AppError.conflict('A user with this email address already exists', { email: 'This email address is already in use' });
  }
  const passwordHash = await hashPassword(input.password); // slow: outside the write lock
  const user = await writeTransaction(async (transaction) => {
    const created = await User.create(
      { email, fullName: input.fullName.trim(), initials: input.initials.trim().toUpperCase(), role: input.role, passwordHash },
      { transaction },
    );
    const fields = audited(created);
    await recordAudit(
      {
        actor,
        action: 'create',
        entity: 'user',
        entityId: created.id,
        changes: diffFields(Object.fromEntries(Object.keys(fields).map((k) => [k, null])), fields),
      },
      transaction,
    );
    return created;
  });
  return toUserDto(user);
}

export async function updateUser(id: number, input: UpdateUserInput, actor: Actor): Promise<UserDto> {
  const user = await load(id);
  if (id === actor.id && input.active === false) {
    throw AppError.conflict('You cannot deactivate your own account', { active: 'You cannot deactivate your own account' });
  }
  if (id === actor.id && input.role !== undefined && input.role !== 'admin') {
    throw AppError.conflict('You cannot remove your own administrator role', { role: 'You cannot remove your own administrator role' });
  }
  await writeTransaction(async (transaction) => {
    await user.reload({ transaction });
    const before = audited(user);
    if (input.fullName !== undefined) user.fullName = input.fullName.trim();
    if (input.initials !== undefined) user.initials = input.initials.trim().toUpperCase();
    if (input.role !== undefined) user.role = input.role;
    if (input.active !== undefined) user.active = input.active;
    const changes = diffFields(before, audited(user));
    if (changes.length === 0) return; // nothing changed: nothing to save or record
    await user.save({ transaction });
    await recordAudit({ actor, action: 'update', entity: 'user', entityId: user.id, changes }, transaction);
  });
  return toUserDto(user);
}

export async function unlockUser(id: number, actor: Actor): Promise<UserDto> {
  const user = await load(id);
  await writeTransaction(async (transaction) => {
    await user.reload({ transaction });
    const before = { locked: user.lockedAt !== null && user.lockedAt !== undefined, failedLoginCount: user.failedLoginCount ?? 0 };
    user.lockedAt = null;
    user.failedLoginCount = 0;
    await user.save({ transaction });
    await recordAudit(
      {
        actor,
        action: 'account_unlocked',
        entity: 'user',
        entityId: user.id,
        changes: diffFields(before, { locked: false, failedLoginCount: 0 }),
      },
      transaction,
    );
  });
  return toUserDto(user);
}

export async function setUserPassword(id: number, password: string, actor: Actor): Promise<UserDto> {
  const user = await load(id);
  const passwordHash = await hashPassword(password); // slow: outside the write lock
  await writeTransaction(async (transaction) => {
    user.passwordHash = passwordHash;
    await user.save({ transaction });
    // The trail says that the password changed, never what it was or is.
    await recordAudit(
      {
        actor,
        action: 'password_changed',
        entity: 'user',
        entityId: user.id,
        changes: [{ field: 'password', oldValue: null, newValue: 'password changed' }],
      },
      transaction,
    );
  });
  return toUserDto(user);
}
