/**
 * User administration (admin role). Accounts are deactivated, never deleted, so user ids are never
 * reused (REQUIREMENTS ES-05). Every change is audited field by field in the same transaction (AT-01, AC-04).
 */
import type { Transaction } from 'sequelize';
import { passwordProblem } from '../../shared/schemas/password-rules.ts';
import type { CreateUserInput, UpdateUserInput, User as UserDto } from '../../shared/schemas/users.ts';
import { User } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';
import { writeTransaction, diffFields } from '../db/transaction.ts';
import { recordAudit } from './audit.service.ts';
import { hashPassword } from './passwords.ts';
import { endUserSessions } from './sessions.service.ts';
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

/** Full names compared ignoring case, spaces and full stops ("Dr. Maren  Tollefsen" = "dr maren tollefsen"). */
const nameKey = (name: string) => name.toLowerCase().replace(/[\s.]+/g, ' ').trim();

/**
 * An e-signature names one person (21 CFR 11.100(a)): no two active accounts may carry the same full name and
 * initials, or a second account could verify its holder's own work under the same printed name. 409 naming
 * both fields. Checked inside the write transaction, so two admins cannot both create the twin.
 */
async function refuseTwin(person: { id?: number; fullName: string; initials: string }, transaction: Transaction): Promise<void> {
  const active = await User.findAll({ where: { active: true }, transaction });
  const twin = active.find(
    (u) => u.id !== person.id && nameKey(u.fullName) === nameKey(person.fullName) && u.initials.toUpperCase() === person.initials.toUpperCase(),
  );
  if (!twin) return;
  const message = `${twin.fullName} (${twin.initials}) already has an active account; one person signs from one account`;
  throw AppError.conflict(message, {
    fullName: 'An active account already has this name and these initials',
    initials: 'An active account already has this name and these initials',
  });
}

/** A password an administrator stores: the rules that need the account (its e-mail and name). */
function refuseWeakPassword(password: string, user: { email: string; fullName: string }): void {
  const problem = passwordProblem(password, user);
  if (problem) throw AppError.validation(problem, { password: problem });
}

/** The fields of a user the audit trail compares (never the password hash). */
const audited = (u: User) => ({ email: u.email, fullName: u.fullName, initials: u.initials, role: u.role, active: Boolean(u.active) });

export async function createUser(input: CreateUserInput, actor: Actor): Promise<UserDto> {
  const email = input.email.trim().toLowerCase();
  if (await User.findOne({ where: { email } })) {
    throw AppError.conflict('A user with this email address already exists', { email: 'This email address is already in use' });
  }
  refuseWeakPassword(input.password, { email, fullName: input.fullName });
  const passwordHash = await hashPassword(input.password); // slow: outside the write lock
  const user = await writeTransaction(async (transaction) => {
    const fullName = input.fullName.trim();
    const initials = input.initials.trim().toUpperCase();
    await refuseTwin({ fullName, initials }, transaction);
    // The administrator chose this password: it is temporary until the person chooses their own.
    const created = await User.create(
      { email, fullName, initials, role: input.role, passwordHash, mustChangePassword: true },
      { transaction },
    );
    const fields = { ...audited(created), mustChangePassword: true };
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
    if (user.active && changes.some((c) => ['fullName', 'initials', 'active'].includes(c.field))) {
      await refuseTwin({ id: user.id, fullName: user.fullName, initials: user.initials }, transaction);
    }
    await user.save({ transaction });
    if (before.active && !user.active) {
      const ended = await endUserSessions(user.id, 'deactivated', transaction);
      changes.push({ field: 'sessionsEnded', oldValue: null, newValue: ended });
    }
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
  refuseWeakPassword(password, user);
  const passwordHash = await hashPassword(password); // slow: outside the write lock
  await writeTransaction(async (transaction) => {
    await user.reload({ transaction });
    const wasTemporary = Boolean(user.mustChangePassword);
    user.passwordHash = passwordHash;
    // Someone else now knows it: temporary until the person chooses their own, and every session ends.
    user.mustChangePassword = true;
    await user.save({ transaction });
    const ended = await endUserSessions(user.id, 'password_reset', transaction);
    // The trail says that the password changed, never what it was or is.
    await recordAudit(
      {
        actor,
        action: 'password_changed',
        entity: 'user',
        entityId: user.id,
        changes: [
          { field: 'password', oldValue: null, newValue: 'password set by an administrator' },
          ...(wasTemporary ? [] : [{ field: 'mustChangePassword', oldValue: false, newValue: true }]),
          { field: 'sessionsEnded', oldValue: null, newValue: ended },
        ],
      },
      transaction,
    );
  });
  return toUserDto(user);
}
