/** Salted slow hashing (bcrypt, cost 10: about 150 ms per hash on the reference machine). */
import bcrypt from 'bcryptjs';

export const BCRYPT_COST = 10;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

let dummyHash: Promise<string> | undefined;
/** Compare against a throw-away hash so an unknown email costs as long as a wrong password. */
export async function burnComparison(password: string): Promise<void> {
  dummyHash ??= bcrypt.hash('not-a-real-password-for-timing', BCRYPT_COST);
  await bcrypt.compare(password, await dummyHash);
}
