/**
 * Password rules (REQUIREMENTS PW-02), after NIST SP 800-63B §5.1.1.2 "Memorized Secret Verifiers":
 * - at least 12 characters (the guideline's floor is 8; 12 is this lab's choice for shared terminals), no
 *   composition rules, spaces and any printable character allowed;
 * - at most 72 bytes in UTF-8, because bcrypt ignores everything after its first 72 bytes (server/services/passwords.ts);
 * - refused when it is a commonly used password (the short list below, shorter ones are refused by length),
 *   one character repeated, or a context-specific word: the account's e-mail address, the part before the @,
 *   the person's name or a part of it (4 letters or more), or the name of this application.
 * Shared by the forms and the server; the server checks the account context on every password it stores.
 */

export const PASSWORD_MIN_LENGTH = 12;
export const PASSWORD_MAX_BYTES = 72;

/** Commonly used passwords of 12 characters or more (compared ignoring case). Short by design; extend as needed. */
export const COMMON_PASSWORDS: readonly string[] = [
  'password1234', 'password12345', 'password123456', 'password123!', 'passwordpassword', 'passw0rd1234', 'p@ssw0rd1234',
  'p@ssword1234', '123456789012', '1234567890123', '12345678901234', '123456123456', '1234512345', 'qwertyuiop12',
  'qwertyuiopasdf', 'qwerty123456', 'qwertyqwerty', '1q2w3e4r5t6y', 'q1w2e3r4t5y6', 'iloveyou1234', 'letmein12345',
  'welcome12345', 'welcome123456', 'changeme1234', 'administrator', 'admin1234567', 'abc123456789', 'abcdefghijkl',
  'abcd1234abcd1234', 'football1234', 'baseball1234', 'sunshine1234', 'princess1234', 'monkey123456', 'dragon123456',
  'trustno1trustno1', 'laboratory123', 'laboratory1234', 'chemistry123', 'chemistry1234', 'correcthorsebatterystaple',
];

/** Words of this application and lab that a password must not contain (NIST: "context-specific words"). */
const APPLICATION_WORDS = ['tarebook'];

export const PASSWORD_MESSAGES = {
  tooShort: `Use at least ${PASSWORD_MIN_LENGTH} characters`,
  tooLong: `Use at most ${PASSWORD_MAX_BYTES} bytes (about ${PASSWORD_MAX_BYTES} letters; accented letters and symbols count 2 to 4)`,
  common: 'This is a commonly used password; choose a less predictable one, e.g. a few unrelated words',
  repeated: 'Do not repeat one character; choose a less predictable password',
  personal: 'Do not use your e-mail address or name in the password',
  application: 'Do not use the name of the application in the password',
} as const;

/** The account a password is for; its e-mail and name must not appear in it. */
export interface PasswordContext {
  email?: string | null;
  fullName?: string | null;
}

const squash = (s: string) => s.toLowerCase().replace(/[\s._\-@'’]+/g, '');

/** The first rule the password breaks, as a field message, or null when it is acceptable. */
export function passwordProblem(password: string, context: PasswordContext = {}): string | null {
  if ([...password].length < PASSWORD_MIN_LENGTH) return PASSWORD_MESSAGES.tooShort;
  if (new TextEncoder().encode(password).length > PASSWORD_MAX_BYTES) return PASSWORD_MESSAGES.tooLong;
  const lower = password.toLowerCase();
  const flat = squash(password);
  if (COMMON_PASSWORDS.includes(lower) || COMMON_PASSWORDS.includes(flat)) return PASSWORD_MESSAGES.common;
  if (/^(.)\1*$/su.test(password)) return PASSWORD_MESSAGES.repeated;
  if (APPLICATION_WORDS.some((w) => flat.includes(w))) return PASSWORD_MESSAGES.application;
  const email = context.email?.trim().toLowerCase() ?? '';
  if (email) {
    const local = email.split('@')[0] ?? '';
    if (lower.includes(email) || (local.length >= 3 && flat.includes(squash(local)))) return PASSWORD_MESSAGES.personal;
  }
  const name = context.fullName?.trim() ?? '';
  if (name) {
    const parts = name.toLowerCase().split(/[\s.,'’-]+/).filter((p) => p.length >= 4);
    if (flat.includes(squash(name)) || parts.some((p) => flat.includes(p))) return PASSWORD_MESSAGES.personal;
  }
  return null;
}
