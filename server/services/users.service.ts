/**
 * User administration (admin role). Accounts are deactivated, never deleted, so user ids are never
 * reused (REQUIREMENTS ES-05).
 */
import type { CreateUserInput, UpdateUserInput, User as UserDto } from '../../shared/schemas/users.ts';
import { User } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';
import { hashPassword } from './passwords.ts';
import { toUserDto } from './user-dto.ts';

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

export async function createUser(input: CreateUserInput): Promise<UserDto> {
  const email = input.email.trim().toLowerCase();
  if (await User.findOne({ where: { email } })) {
    throw AppError.conflict('A user with this email address already exists', { email: 'This email address is already in use' });
  }
  const user = await User.create({
    email,
    fullName: input.fullName.trim(),
    initials: input.initials.trim().toUpperCase(),
    role: input.role,
    passwordHash: await hashPassword(input.password),
  });
  return toUserDto(user);
}

export async function updateUser(id: number, input: UpdateUserInput, actorId: number): Promise<UserDto> {
  const user = await load(id);
  if (id === actorId && input.active === false) {
    throw AppError.conflict('You cannot deactivate your own account', { active: 'You cannot deactivate your own account' });
  }
  if (id === actorId && input.role !== undefined && input.role !== 'admin') {
    throw AppError.conflict('You cannot remove your own administrator role', { role: 'You cannot remove your own administrator role' });
  }
  if (input.fullName !== undefined) user.fullName = input.fullName.trim();
  if (input.initials !== undefined) user.initials = input.initials.trim().toUpperCase();
  if (input.role !== undefined) user.role = input.role;
  if (input.active !== undefined) user.active = input.active;
  await user.save();
  return toUserDto(user);
}

export async function unlockUser(id: number): Promise<UserDto> {
  const user = await load(id);
  user.lockedAt = null;
  user.failedLoginCount = 0;
  await user.save();
  return toUserDto(user);
}

export async function setUserPassword(id: number, password: string): Promise<UserDto> {
  const user = await load(id);
  user.passwordHash = await hashPassword(password);
  await user.save();
  return toUserDto(user);
}
