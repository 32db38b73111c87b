/**
 * Salted slow hashing: bcrypt (bcryptjs), cost factor 10 = 2^10 rounds of the key schedule, about 150 ms per
 * hash or comparison on the reference machine (2 cores; docs STACK §1: cost 12 takes about 500 ms). 10 is the
 * lowest cost OWASP's password storage guidance accepts for bcrypt; raise BCRYPT_COST when the server is faster
 * (existing hashes keep their own cost, stored in the hash, and still verify). bcrypt reads only the first 72
 * bytes of a password, so shared/schemas/password-rules.ts refuses longer ones.
 */
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
